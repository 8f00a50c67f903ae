import { idParams } from '../../../../shared/schemas/common'
import { creditNoteSchema } from '../../../../shared/schemas/invoices'

// Credits a whole issued invoice with a numbered credit note (the office only).
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice, client } = await requireInvoiceAccess(event, id, { admin: true })
  const { reason } = await readValidatedJson(event, creditNoteSchema)
  const note = await creditInvoice(user, invoice, client, reason)
  setResponseStatus(event, 201)
  return note
})
