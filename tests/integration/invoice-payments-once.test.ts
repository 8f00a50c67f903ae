// One invoice, one payment: one open checkout whoever asks (two payers at once get the same session and pay once),
// the webhook checking the charged currency and amount against the invoice (a mismatch listed for the office, no
// payment), deliveries signed in the future or for an unknown invoice refused, an overpayment shown as money to
// refund and its refund recorded.
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { signIn, type Agent } from '../support/http'
import { ADMIN, HANDLER_A } from '../support/people'
import { sqlRows } from '../support/db'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')
const OPEN_A = seedId('invoice:fair-2') // seeded: 40200p open
const PAID_A = seedId('invoice:fair-1') // seeded: paid
const OK_CARD = '4242 4242 4242 4242' // the fake's succeeding test card (its header)

const query = (sql: string, args: (string | number)[] = []) => sqlRows<Record<string, unknown>>(databaseUrl, sql, args)
const invoiceRow = async (id: string) => (await query('select status, paid_minor, refunded_minor from invoices where id = ?', [id]))[0]!
const payments = async (id: string) => Number((await query('select count(*) n from invoice_payments where invoice_id = ?', [id]))[0]!.n)
const payOnPage = (url: string) => fetch(url, {
  method: 'POST', redirect: 'manual', body: new URLSearchParams({ card: OK_CARD, code: '' }), headers: { 'content-type': 'application/x-www-form-urlencoded' },
})
async function until<T>(what: string, fn: () => Promise<T | undefined | false>): Promise<T> {
  const deadline = Date.now() + 10_000
  for (;;) {
    const v = await fn()
    if (v) return v
    if (Date.now() > deadline) throw new Error(`Timed out waiting for ${what}`)
    await new Promise(r => setTimeout(r, 100))
  }
}
async function fakeEvents(fakeUrl: string) {
  return (await (await fetch(`${fakeUrl}/_fake/events`)).json()) as Array<{ id: string, type: string, payload: string, deliveries: Array<{ status: number }> }>
}

let handler: Agent
let admin: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  handler = await signIn(baseUrl, HANDLER_A)
  admin = await signIn(baseUrl, ADMIN)
})

describe('one open checkout per invoice', () => {
  it('gives two payers asking at once the same session, and the invoice is paid once', async () => {
    const [a, b] = await Promise.all([handler.post(`/api/invoices/${OPEN_A}/checkout`), admin.post(`/api/invoices/${OPEN_A}/checkout`)])
    expect(a.status, JSON.stringify(a.body)).toBe(200)
    expect(b.status, JSON.stringify(b.body)).toBe(200)
    expect(b.body.sessionId).toBe(a.body.sessionId)
    // Asked again later: still the same open session.
    expect((await handler.post(`/api/invoices/${OPEN_A}/checkout`)).body.sessionId).toBe(a.body.sessionId)
    const paid = await payOnPage(a.body.url)
    expect(paid.status).toBe(303)
    // The return address is the same for every payer; it sends each on to their own area.
    expect(paid.headers.get('location')).toBe(`${baseUrl}/invoices/${OPEN_A}?paid=1`)
    // The second payer's page (the same session) takes no second card payment.
    const second = await payOnPage(b.body.url)
    expect(second.status).toBe(303)
    await until('the payment', async () => (await invoiceRow(OPEN_A)).status === 'paid')
    expect(await invoiceRow(OPEN_A)).toMatchObject({ status: 'paid', paid_minor: 40200 })
    expect(await payments(OPEN_A)).toBe(1)
    expect((await admin.post(`/api/invoices/${OPEN_A}/checkout`)).status).toBe(409)
  })

  it('expires the open session when the amount owed changes, so the old one cannot be paid', async () => {
    const first = (await handler.post(`/api/invoices/${OPEN_A}/checkout`)).body
    expect((await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 200, method: 'cash', receivedOn: '2026-11-20' })).status).toBe(201)
    const next = await handler.post(`/api/invoices/${OPEN_A}/checkout`)
    expect(next.status).toBe(200)
    expect(next.body.sessionId).not.toBe(first.sessionId)
    expect((await payOnPage(first.url)).status).toBe(410)
    expect(await payments(OPEN_A)).toBe(1) // the cash only
  })
})

describe('the webhook checks what was charged', () => {
  for (const [label, override, kind] of [
    ['another currency', { currency: 'usd' }, 'currency-mismatch'],
    ['another amount', { amount_total: 100 }, 'amount-mismatch'],
  ] as const) {
    it(`records no payment for a charge in ${label} and lists it for the office`, async () => {
      const co = (await handler.post(`/api/invoices/${OPEN_A}/checkout`)).body
      const fakeUrl = new URL(co.url).origin
      await fetch(`${fakeUrl}/_fake/sessions/${co.sessionId}/complete`, { method: 'POST', body: JSON.stringify(override) })
      const problem = await until('the problem', async () => ((await admin.get('/api/payment-problems')).body.rows as any[]).find(p => p.invoiceId === OPEN_A))
      expect(problem).toMatchObject({ kind, resolvedAt: null, invoiceNumber: expect.stringMatching(/^INV-/) })
      // The fake keeps every event since it started: this test's is the one naming its session.
      const evt = await until('the delivery', async () => (await fakeEvents(fakeUrl)).find(e => e.type === 'checkout.session.completed' && e.payload.includes(co.sessionId) && e.deliveries.length))
      expect(evt.deliveries[0]!.status).toBe(200)
      expect(await invoiceRow(OPEN_A)).toMatchObject({ status: 'open', paid_minor: 0 })
      expect(await payments(OPEN_A)).toBe(0)
      // The office says what it did; the problem leaves the list of open ones; a second time is refused.
      const bad = await admin.post(`/api/payment-problems/${problem.id}/resolve`, { resolution: '' })
      expect(bad.status).toBe(422)
      expect((await admin.post(`/api/payment-problems/${problem.id}/resolve`, { resolution: 'Refunded with the provider.' })).status).toBe(200)
      expect((await admin.post(`/api/payment-problems/${problem.id}/resolve`, { resolution: 'Again.' })).status).toBe(409)
    })
  }

  it('refuses a delivery signed in the future and one for an unknown invoice, with a 4xx naming the problem', async () => {
    const co = (await handler.post(`/api/invoices/${OPEN_A}/checkout`)).body
    const fakeUrl = new URL(co.url).origin
    await fetch(`${fakeUrl}/_fake/sessions/${co.sessionId}/complete`, { method: 'POST', body: JSON.stringify({ metadata: { invoiceId: 'no-such-invoice' } }) })
    const evt = await until('the event', async () => (await fakeEvents(fakeUrl)).find(e => e.type === 'checkout.session.completed' && e.payload.includes(co.sessionId) && e.deliveries.length))
    expect(evt.deliveries[0]!.status).toBe(422)
    const problems = (await admin.get('/api/payment-problems')).body.rows as any[]
    expect(problems).toEqual([expect.objectContaining({ kind: 'unknown-invoice', invoiceId: null })])
    // Signed 10 minutes ahead of the clock (beyond the 5-minute tolerance): refused before anything is read.
    const future = await (await fetch(`${fakeUrl}/_fake/events/${evt.id}/resend?age=-600`, { method: 'POST' })).json() as { status: number }
    expect(future.status).toBe(400)
    expect(await payments(OPEN_A)).toBe(0)
  })
})

describe('overpayment and refunds', () => {
  it('shows money paid beyond the total as to refund, and records the refund', async () => {
    const co = (await handler.post(`/api/invoices/${OPEN_A}/checkout`)).body
    // Cash comes in while the household's payment page is open; then the page is paid as it stands.
    expect((await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 200, method: 'cash', receivedOn: '2026-11-20' })).status).toBe(201)
    expect((await payOnPage(co.url)).status).toBe(303)
    await until('the payment', async () => (await invoiceRow(OPEN_A)).status === 'paid')
    const detail = (await admin.get(`/api/invoices/${OPEN_A}`)).body
    expect(detail).toMatchObject({ paidMinor: 40400, refundDueMinor: 200 })
    expect((await admin.post(`/api/invoices/${OPEN_A}/refunds`, { amountMinor: 201, method: 'bank_transfer', paidOn: '2026-11-21' })).status).toBe(422)
    const refund = await admin.post(`/api/invoices/${OPEN_A}/refunds`, { amountMinor: 200, method: 'bank_transfer', paidOn: '2026-11-21' })
    expect(refund.status, JSON.stringify(refund.body)).toBe(201)
    expect((await admin.get(`/api/invoices/${OPEN_A}`)).body).toMatchObject({ refundDueMinor: 0, refunds: [expect.objectContaining({ amountMinor: 200 })] })
    expect((await admin.post(`/api/invoices/${OPEN_A}/refunds`, { amountMinor: 1, method: 'cash', paidOn: '2026-11-21' })).status).toBe(409)
  })

  it('pays back a credited paid invoice through its credit note, which is then settled', async () => {
    const note = (await admin.post(`/api/invoices/${PAID_A}/credit-note`, { reason: 'Programme ended early.' })).body
    const owed = -note.grossMinor
    expect((await admin.get(`/api/invoices/${note.id}`)).body).toMatchObject({ kind: 'credit_note', status: 'open', refundDueMinor: owed, creditsInvoiceId: PAID_A })
    expect((await admin.post(`/api/invoices/${note.id}/refunds`, { amountMinor: owed, method: 'bank_transfer', paidOn: '2026-11-21' })).status).toBe(201)
    expect(await invoiceRow(note.id)).toMatchObject({ status: 'paid', refunded_minor: owed })
  })
})
