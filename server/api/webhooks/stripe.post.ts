// Stripe's webhook: signature checked on the raw body (no session, no origin check); each event processed once.
export default defineEventHandler(async (event) => {
  const raw = (await readRawBody(event, 'utf8')) ?? ''
  return handleStripeWebhook(raw, getHeader(event, 'stripe-signature'))
})
