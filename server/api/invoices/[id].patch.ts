import { idParams } from '../../../shared/schemas/common'
import { invoiceCreateSchema } from '../../../shared/schemas/invoices'

// The office edits a draft (lines, note, days to pay). An issued invoice answers 409: it is credited, never edited.
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice, client } = await requireInvoiceAccess(event, id, { admin: true })
  const input = await readValidatedJson(event, invoiceCreateSchema)
  return updateInvoiceDraft(user, invoice, client, input)
})
