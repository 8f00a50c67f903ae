// fake-services/stripe speaks what the real stripe SDK expects: its signatures pass constructEvent, its sessions and
// errors parse, and an idempotency key returns the same session.
import Stripe from 'stripe'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { parseForm, signPayload, startFakeStripe, type FakeStripe } from '../../fake-services/stripe/server.mjs'

const SECRET = 'whsec_unit_test'
let fake: FakeStripe
let stripe: Stripe
beforeAll(async () => {
  fake = await startFakeStripe({ port: 0, webhookSecret: SECRET, quiet: true })
  stripe = new Stripe('sk_test_unit', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0 })
})
afterAll(async () => { await fake.close() })

describe('fake Stripe', () => {
  it('signs webhooks so the SDK verifies them, and a changed body fails', () => {
    const payload = JSON.stringify({ id: 'evt_1', object: 'event', type: 'checkout.session.completed', data: { object: {} } })
    const header = signPayload(payload, SECRET)
    expect(stripe.webhooks.constructEvent(payload, header, SECRET).id).toBe('evt_1')
    expect(() => stripe.webhooks.constructEvent(payload.replace('evt_1', 'evt_2'), header, SECRET)).toThrow()
    expect(() => stripe.webhooks.constructEvent(payload, signPayload(payload, SECRET, Math.floor(Date.now() / 1000) - 600), SECRET)).toThrow()
  })

  it('reads nested form fields as Stripe does', () => {
    expect(parseForm('line_items[0][price_data][unit_amount]=500&line_items[0][quantity]=1&metadata[invoiceId]=x&mode=payment')).toEqual({
      line_items: [{ price_data: { unit_amount: '500' }, quantity: '1' }], metadata: { invoiceId: 'x' }, mode: 'payment',
    })
  })

  it('creates a Checkout Session through the SDK, idempotently, and answers errors in Stripe\'s format', async () => {
    const params: Stripe.Checkout.SessionCreateParams = {
      mode: 'payment', success_url: 'http://localhost/ok', metadata: { invoiceId: 'inv_1' },
      line_items: [{ quantity: 2, price_data: { currency: 'gbp', unit_amount: 1250, product_data: { name: 'Visit' } } }],
    }
    const a = await stripe.checkout.sessions.create(params, { idempotencyKey: 'k1' })
    expect(a).toMatchObject({ object: 'checkout.session', amount_total: 2500, currency: 'gbp', status: 'open', metadata: { invoiceId: 'inv_1' } })
    expect(a.url).toBe(`${fake.url}/pay/${a.id}`)
    expect((await stripe.checkout.sessions.create(params, { idempotencyKey: 'k1' })).id).toBe(a.id)
    expect((await stripe.checkout.sessions.retrieve(a.id)).id).toBe(a.id)
    await expect(stripe.checkout.sessions.create({ ...params, line_items: [] }, { idempotencyKey: 'k2' })).rejects.toMatchObject({ type: 'StripeInvalidRequestError', statusCode: 400 })
    await expect(new Stripe('nope', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0 }).checkout.sessions.retrieve(a.id)).rejects.toMatchObject({ statusCode: 401 })
  })
})
