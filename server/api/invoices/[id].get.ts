import { idParams } from '../../../shared/schemas/common'

// One invoice with its lines and payments (the household sees its own issued ones).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice, client } = await requireInvoiceAccess(event, id)
  return getInvoiceDetail(user, invoice, client)
})
