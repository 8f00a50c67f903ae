// Stripe's webhook (no session, no origin check): the body's size is checked first (413 past the webhook limit,
// before and while reading), then the signature on the raw bytes, and only then is it parsed; each event is
// processed once.
export default defineEventHandler(async (event) => {
  const signature = getHeader(event, 'stripe-signature')
  if (!signature) {
    logEvent('webhook.refused', { reason: 'no signature' }, 'warn', event)
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'Webhook refused: no Stripe-Signature header.' })
  }
  const raw = (await readBodyCapped(event, bodyLimitOf(event))).toString('utf8')
  try {
    return await handleStripeWebhook(raw, signature)
  }
  catch (err) {
    if ((err as { statusCode?: number }).statusCode === 400) logEvent('webhook.refused', { reason: 'signature' }, 'warn', event)
    throw err
  }
})
