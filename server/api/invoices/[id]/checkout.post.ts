import { idParams } from '../../../../shared/schemas/common'

// Starts a card payment for an open invoice: the household's handlers and the office get the payment page address.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice } = await requireInvoiceAccess(event, id)
  if (user.role === 'trainer') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Payments are made by the household or taken by the office.' })
  return createInvoiceCheckout(invoice)
})
