// Card payments the webhook did not record (another currency or amount, an unknown invoice): the office only.
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  return listPaymentProblems()
})
