import Stripe from 'stripe'

// The stripe SDK, pointed by env vars at the real service or at fake-services/stripe (development and tests):
//   STRIPE_SECRET_KEY, STRIPE_WEBHOOK_SECRET, and for the fake STRIPE_API_HOST / STRIPE_API_PORT / STRIPE_API_PROTOCOL.
let client: Stripe | undefined

export function stripeConfigured(): boolean {
  return !!process.env.STRIPE_SECRET_KEY
}

export function useStripeClient(): Stripe {
  if (!process.env.STRIPE_SECRET_KEY) {
    throw createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'Card payments are not set up for this business yet. Pay by bank transfer, or ask the office.' })
  }
  client ??= new Stripe(process.env.STRIPE_SECRET_KEY, {
    host: process.env.STRIPE_API_HOST || undefined,
    port: process.env.STRIPE_API_PORT ? Number(process.env.STRIPE_API_PORT) : undefined,
    protocol: (process.env.STRIPE_API_PROTOCOL as 'http' | 'https' | undefined) || undefined,
    maxNetworkRetries: 2, // retried with the same idempotency key, so never charged twice
    timeout: 10_000,
  })
  return client
}

export function stripeWebhookSecret(): string {
  const secret = process.env.STRIPE_WEBHOOK_SECRET
  if (!secret) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'Webhooks are not set up (STRIPE_WEBHOOK_SECRET is missing).' })
  return secret
}
