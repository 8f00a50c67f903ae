import { idParams } from '../../../../shared/schemas/common'
import { invoiceCreateSchema } from '../../../../shared/schemas/invoices'

// Drafts an invoice for a client by hand (the office only); it is numbered when issued.
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const input = await readValidatedJson(event, invoiceCreateSchema)
  const invoice = await createInvoiceDraft(user, client, input)
  setResponseStatus(event, 201)
  return invoice
})
