import { seedId } from '../../../scripts/lib/seed-data'
import { CLIENT_A } from '../../support/people'
import { adminOnly, clientA, expect, signedIn, type Row } from '../../support/authz'
import type { Agent } from '../../support/http'

// Seeded: client A's open instalment invoice (issued, so its household sees it).
const OPEN_A = seedId('invoice:fair-2')

async function draftForA(admin: Agent) {
  const res = await admin.post(`/api/clients/${CLIENT_A}/invoices`, { lines: [{ description: 'Extra session', unitMinor: 4500, quantity: 1, taxRateBasisPoints: 2000 }] })
  if (res.status !== 201) throw new Error(`Could not draft an invoice: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.id as string }
}

export const rows: Row[] = [
  {
    route: 'GET /api/invoices', path: '/api/invoices',
    expect: {
      ...signedIn(200),
      // Each household sees only its own issued invoices; a trainer only their clients'.
      handlerA: { status: 200, check: (r) => { expect(r.body.rows.length).toBeGreaterThan(0); expect(r.body.rows.every((x: any) => x.householdName === 'Fairweather household' && x.status !== 'draft')).toBe(true) } },
      handlerB: { status: 200, check: r => expect(r.body.rows.every((x: any) => x.householdName === 'Achterberg household')).toBe(true) },
      trainerB: { status: 200, check: r => expect(r.body.rows.some((x: any) => x.householdName === 'Fairweather household')).toBe(false) },
    },
  },
  {
    route: 'GET /api/invoices/upcoming', path: '/api/invoices/upcoming',
    expect: {
      ...signedIn(200),
      // A household sees its own plan's instalments to come (seeded for Fairweather and Achterberg), never another's.
      handlerA: { status: 200, check: (r) => { expect(r.body.rows.length).toBeGreaterThan(0); expect(r.body.rows.every((x: any) => x.householdName === 'Fairweather household' && !('id' in x))).toBe(true) } },
      handlerB: { status: 200, check: (r) => { expect(r.body.rows.length).toBeGreaterThan(0); expect(r.body.rows.every((x: any) => x.householdName === 'Achterberg household')).toBe(true) } },
      trainerB: { status: 200, check: r => expect(r.body.rows.some((x: any) => x.householdName === 'Fairweather household')).toBe(false) },
    },
  },
  { route: 'GET /api/invoices/[id]', path: `/api/invoices/${OPEN_A}`, expect: clientA(200) },
  { route: 'POST /api/clients/[id]/invoices', path: `/api/clients/${CLIENT_A}/invoices`, body: { lines: [{ description: 'Extra session', unitMinor: 4500, quantity: 1, taxRateBasisPoints: 0 }] }, mutates: true, expect: adminOnly(201) },
  { route: 'POST /api/invoices/[id]/issue', path: (_a, ctx) => `/api/invoices/${ctx.id}/issue`, prepare: draftForA, mutates: true, expect: adminOnly(200) },
  { route: 'POST /api/invoices/[id]/void', path: (_a, ctx) => `/api/invoices/${ctx.id}/void`, prepare: draftForA, mutates: true, expect: adminOnly(200) },
  { route: 'POST /api/invoices/[id]/credit-note', path: `/api/invoices/${OPEN_A}/credit-note`, body: { reason: 'Visit cancelled by us.' }, mutates: true, expect: adminOnly(201) },
  { route: 'POST /api/invoices/[id]/payments', path: `/api/invoices/${OPEN_A}/payments`, body: { amountMinor: 1000, method: 'cash', receivedOn: '2026-01-05' }, mutates: true, expect: adminOnly(201) },
]

// Card payments: the household and the office start a checkout; the trainer does not take money.
rows.push(
  { route: 'POST /api/invoices/[id]/checkout', path: `/api/invoices/${OPEN_A}/checkout`, expect: { ...clientA(200), trainerA: 403 } },
  // Stripe's webhook has no session: every caller without a valid signature is refused alike.
  { route: 'POST /api/webhooks/stripe', path: '/api/webhooks/stripe', body: { id: 'evt_forged', type: 'checkout.session.completed' }, expect: { anonymous: 400, handlerA: 400, handlerB: 400, trainerA: 400, trainerB: 400, admin: 400 } },
)

// The PDF: the household, its trainer and the office; nobody else.
rows.push({
  route: 'GET /api/invoices/[id]/pdf', path: `/api/invoices/${OPEN_A}/pdf`,
  expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(String(r.headers.get('content-type'))).toContain('application/pdf') } },
})

// Refunds and card payments to look into: the office only.
const PAID_A = seedId('invoice:fair-1')
async function creditNoteForPaidA(admin: Agent) {
  const res = await admin.post(`/api/invoices/${PAID_A}/credit-note`, { reason: 'Programme ended early.' })
  if (res.status !== 201) throw new Error(`Could not credit: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.id as string }
}
async function paymentProblemOnA(admin: Agent) {
  const co = await admin.post(`/api/invoices/${OPEN_A}/checkout`)
  if (co.status !== 200) throw new Error(`Could not start a checkout: ${co.status} ${JSON.stringify(co.body)}`)
  // The fake provider charges another currency: the webhook lists it as a problem instead of a payment.
  await fetch(`${new URL(co.body.url).origin}/_fake/sessions/${co.body.sessionId}/complete`, { method: 'POST', body: JSON.stringify({ currency: 'usd' }) })
  const deadline = Date.now() + 10_000
  for (;;) {
    const open = ((await admin.get('/api/payment-problems')).body.rows as Array<{ id: string, resolvedAt: string | null }>).find(p => !p.resolvedAt)
    if (open) return { id: open.id }
    if (Date.now() > deadline) throw new Error('No payment problem was listed')
    await new Promise(r => setTimeout(r, 100))
  }
}
rows.push(
  { route: 'POST /api/invoices/[id]/refunds', path: (_a, ctx) => `/api/invoices/${ctx.id}/refunds`, prepare: creditNoteForPaidA, body: { amountMinor: 100, method: 'bank_transfer', paidOn: '2026-01-05' }, mutates: true, expect: adminOnly(201) },
  { route: 'GET /api/payment-problems', path: '/api/payment-problems', expect: adminOnly(200) },
  { route: 'POST /api/payment-problems/[id]/resolve', path: (_a, ctx) => `/api/payment-problems/${ctx.id}/resolve`, prepare: paymentProblemOnA, body: { resolution: 'Refunded with the provider.' }, mutates: true, expect: adminOnly(200) },
)

// A receipt PDF: the household that paid, its trainer and the office (the seeded bank transfer on the paid invoice).
rows.push({
  route: 'GET /api/invoices/[id]/receipts/[paymentId]',
  path: (_a, ctx) => `/api/invoices/${PAID_A}/receipts/${ctx.paymentId}`,
  prepare: async admin => ({ paymentId: String((await admin.get(`/api/invoices/${PAID_A}`)).body.payments[0].id) }),
  expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(String(r.headers.get('content-type'))).toContain('application/pdf') } },
})

// Who a client's invoices are addressed to: the office only.
rows.push({ route: 'PUT /api/clients/[id]/billing', path: `/api/clients/${CLIENT_A}/billing`, body: { billingName: 'Fairweather Family Trust', billingAddressLine: '1 Invented Row', billingTown: 'Ashcombe', billingPostcode: 'AC1 1AA', billingCountry: 'GB' }, mutates: true, expect: adminOnly(200) })

// Editing a draft: the office only.
rows.push({ route: 'PATCH /api/invoices/[id]', path: (_a, ctx) => `/api/invoices/${ctx.id}`, prepare: draftForA, body: { lines: [{ description: 'Extra session (edited)', unitMinor: 5000, quantity: 1, taxRateBasisPoints: 2000 }] }, mutates: true, expect: adminOnly(200) })

// The accountant's export: the office only.
rows.push({ route: 'GET /api/invoices/export.csv', path: '/api/invoices/export.csv?from=2026-01-01&to=2026-12-31', expect: { ...adminOnly(200), admin: { status: 200, check: r => expect(String(r.body)).toMatch(/^record,number,date/) } } })
