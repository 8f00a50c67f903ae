import { idParams } from '../../../../shared/schemas/common'

// Discards a draft invoice (the office only). An issued invoice is corrected with a credit note instead.
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice } = await requireInvoiceAccess(event, id, { admin: true })
  return voidDraftInvoice(user, invoice)
})
