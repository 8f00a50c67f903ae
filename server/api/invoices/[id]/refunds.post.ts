import { idParams } from '../../../../shared/schemas/common'
import { refundSchema } from '../../../../shared/schemas/invoices'

// Records money paid back to the household: an overpaid invoice, or the credit note of a paid one (the office only).
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice, client } = await requireInvoiceAccess(event, id, { admin: true })
  const input = await readValidatedJson(event, refundSchema)
  const result = await recordRefund(user, invoice, client, input)
  setResponseStatus(event, 201)
  return result
})
