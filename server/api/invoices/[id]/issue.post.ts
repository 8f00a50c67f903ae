import { idParams } from '../../../../shared/schemas/common'

// Issues a draft: it gets the next number of the year and the household is e-mailed (the office only).
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice, client } = await requireInvoiceAccess(event, id, { admin: true })
  return issueInvoice(user, invoice, client)
})
