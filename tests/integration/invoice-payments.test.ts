// Card payments through fake-services/stripe: a full checkout on the fake's payment page, its signed webhook marking
// the invoice paid with a receipt, replays changing nothing, forged and stale deliveries refused, the fake down.
import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { signIn, waitForMail, type Agent } from '../support/http'
import { ADMIN, HANDLER_A } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')
const OPEN_A = seedId('invoice:fair-2') // seeded: 40200p open
const PAID_A = seedId('invoice:fair-1')
// Test cards of fake-services/stripe (our own choice, see its header).
const OK_CARD = '4242 4242 4242 4242'
const DECLINED_CARD = '4000 0000 0000 0002'

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const invoiceRow = async (id: string) => (await query('select status, paid_minor from invoices where id = ?', [id]))[0]!
const payments = async (id: string) => Number((await query('select count(*) n from invoice_payments where invoice_id = ?', [id]))[0]!.n)

let handler: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  handler = await signIn(baseUrl, HANDLER_A)
})

async function checkout() {
  const res = await handler.post(`/api/invoices/${OPEN_A}/checkout`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body as { url: string, sessionId: string }
}
const payOnPage = (url: string, card: string, code = '') => fetch(url, {
  method: 'POST', redirect: 'manual', body: new URLSearchParams({ card, code }), headers: { 'content-type': 'application/x-www-form-urlencoded' },
})
async function waitForStatus(id: string, status: string) {
  const deadline = Date.now() + 10_000
  for (;;) {
    const row = await invoiceRow(id)
    if (row.status === status) return row
    if (Date.now() > deadline) throw new Error(`Invoice stayed ${row.status}`)
    await new Promise(r => setTimeout(r, 100))
  }
}
async function fakeEvents(fakeUrl: string) {
  return (await (await fetch(`${fakeUrl}/_fake/events`)).json()) as Array<{ id: string, type: string, payload: string, deliveries: Array<{ status: number }> }>
}

describe('card payment through the fake Stripe', () => {
  it('pays an invoice on the payment page; the signed webhook marks it paid once and a receipt arrives', async () => {
    const { url, sessionId } = await checkout()
    const fakeUrl = new URL(url).origin
    // The same request again reuses the session (idempotency key), so nothing is charged twice.
    expect((await checkout()).sessionId).toBe(sessionId)

    // A declined card: the page says so, nothing is recorded.
    const declined = await payOnPage(url, DECLINED_CARD)
    expect(declined.status).toBe(402)
    expect(await declined.text()).toContain('declined')
    expect(await invoiceRow(OPEN_A)).toMatchObject({ status: 'open', paid_minor: 0 })

    const ok = await payOnPage(url, OK_CARD)
    expect(ok.status).toBe(303)
    expect(ok.headers.get('location')).toContain(`/invoices/${OPEN_A}?paid=1`)
    expect(await waitForStatus(OPEN_A, 'paid')).toMatchObject({ paid_minor: 40200 })
    expect(await payments(OPEN_A)).toBe(1)
    const receipt = await waitForMail(mailUrl, HANDLER_A, 'Receipt for £402.00')
    expect(receipt.text).toContain('paid in full')
    expect((await handler.get(`/api/invoices/${OPEN_A}`)).body).toMatchObject({ status: 'paid', state: 'paid', balanceMinor: 0 })

    // Replaying the delivered event changes nothing.
    // The fake keeps every event since it started (other tests' too): this one names this test's session.
    const [evt] = (await fakeEvents(fakeUrl)).filter(e => e.type === 'checkout.session.completed' && e.payload.includes(sessionId))
    expect(evt!.deliveries[0]!.status).toBe(200)
    const replay = await (await fetch(`${fakeUrl}/_fake/events/${evt!.id}/resend`, { method: 'POST' })).json() as { status: number }
    expect(replay.status).toBe(200)
    expect(await payments(OPEN_A)).toBe(1)
    expect(await invoiceRow(OPEN_A)).toMatchObject({ status: 'paid', paid_minor: 40200 })
    expect(Number((await query('select count(*) n from stripe_events where id = ?', [evt!.id]))[0]!.n)).toBe(1)

    // A stale delivery (signed 10 minutes ago, beyond the SDK's 5-minute tolerance) is refused.
    const stale = await (await fetch(`${fakeUrl}/_fake/events/${evt!.id}/resend?age=600`, { method: 'POST' })).json() as { status: number }
    expect(stale.status).toBe(400)

    // Paying a paid invoice is refused.
    const again = await handler.post(`/api/invoices/${OPEN_A}/checkout`)
    expect(again.status).toBe(409)
  })

  it('refuses a forged or tampered webhook with 400 and records nothing', async () => {
    const { url } = await checkout()
    const fakeUrl = new URL(url).origin
    // A validly signed event from an earlier session, then its body altered under the same signature.
    const payload = JSON.stringify({ id: 'evt_forged_1', object: 'event', type: 'checkout.session.completed', created: Math.floor(Date.now() / 1000), data: { object: { id: 'cs_x', payment_status: 'paid', amount_total: 40200, metadata: { invoiceId: OPEN_A } } } })
    const forged = await fetch(`${baseUrl}/api/webhooks/stripe`, { method: 'POST', body: payload, headers: { 'content-type': 'application/json', 'stripe-signature': `t=${Math.floor(Date.now() / 1000)},v1=${'0'.repeat(64)}` } })
    expect(forged.status).toBe(400)
    const unsigned = await fetch(`${baseUrl}/api/webhooks/stripe`, { method: 'POST', body: payload, headers: { 'content-type': 'application/json' } })
    expect(unsigned.status).toBe(400)
    expect(await invoiceRow(OPEN_A)).toMatchObject({ status: 'open', paid_minor: 0 })
    expect(await payments(OPEN_A)).toBe(0)
    expect(Number((await query('select count(*) n from stripe_events'))[0]!.n)).toBe(0)
    expect(fakeUrl).toMatch(/^http:\/\/127\.0\.0\.1:/)
  })

  it('answers 503 with a clear message when the fake Stripe is down, and 409 for a paid invoice', async () => {
    const { url } = await checkout()
    const fakeUrl = new URL(url).origin
    await fetch(`${fakeUrl}/_fake/down`, { method: 'POST' })
    try {
      const admin = await signIn(baseUrl, ADMIN)
      // A new amount means a new idempotency key, so the SDK really calls the (down) service.
      expect((await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 200, method: 'cash', receivedOn: '2026-11-20' })).status).toBe(201)
      const res = await handler.post(`/api/invoices/${OPEN_A}/checkout`)
      expect(res.status).toBe(503)
      expect(res.body.message).toMatch(/Nothing was charged/)
    }
    finally {
      await fetch(`${fakeUrl}/_fake/down`, { method: 'POST' })
    }
    expect((await handler.post(`/api/invoices/${PAID_A}/checkout`)).status).toBe(409)
    expect(await invoiceRow(OPEN_A)).toMatchObject({ status: 'open', paid_minor: 200 })
  })
})
