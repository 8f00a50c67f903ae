import { idParams } from '../../../../shared/schemas/common'
import { manualPaymentSchema } from '../../../../shared/schemas/invoices'

// Records a bank transfer or cash received against an open invoice (the office only); a receipt is e-mailed.
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice, client } = await requireInvoiceAccess(event, id, { admin: true })
  const input = await readValidatedJson(event, manualPaymentSchema)
  const result = await recordManualPayment(user, invoice, client, input)
  setResponseStatus(event, 201)
  return result
})
