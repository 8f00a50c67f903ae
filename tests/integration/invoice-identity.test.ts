// The business identity on invoices and invoices frozen at issue: the seller and buyer blocks, bank details and
// wording printed from the record frozen when the invoice was issued (the same text after the settings change),
// issuing refused while the identity is incomplete (no number used), credit notes naming the invoice they correct,
// receipts with their own plain number and PDF, and the bad input of the issue answered with a 4xx naming it.
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { inbox, signIn, waitForMail, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, HANDLER_A } from '../support/people'
import { pdfText } from '../support/pdf'
import { sqlRows } from '../support/db'
import { resetDatabase } from '../support/stack'
import { TINY_PNG } from './authz-rows/settings'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')
const OPEN_A = seedId('invoice:fair-2')

const query = (sql: string, args: (string | number)[] = []) => sqlRows<Record<string, unknown>>(databaseUrl, sql, args)
let admin: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  admin = await signIn(baseUrl, ADMIN)
})

async function pdfOf(agent: Agent, path: string) {
  const res = await fetch(`${baseUrl}${path}`, { headers: { cookie: agent.cookie } })
  expect(res.status).toBe(200)
  return pdfText(new Uint8Array(await res.arrayBuffer()))
}
async function draftAndIssue(lines = [{ description: 'Extra home visit', unitMinor: 8500, quantity: 1, taxRateBasisPoints: 2000 }]) {
  const draft = await admin.post(`/api/clients/${CLIENT_A}/invoices`, { lines })
  expect(draft.status, JSON.stringify(draft.body)).toBe(201)
  const issued = await admin.post(`/api/invoices/${draft.body.id}/issue`)
  expect(issued.status, JSON.stringify(issued.body)).toBe(200)
  return issued.body as { id: string, number: string }
}
const identity = async () => (await admin.get('/api/settings/business-identity')).body.value

describe('invoices frozen at issue', () => {
  it('prints the seller, buyer and bank details as issued, the same text after the settings change', async () => {
    const inv = await draftAndIssue()
    const before = await pdfOf(admin, `/api/invoices/${inv.id}/pdf`)
    for (const needle of ['Larkspur Scent Partners Ltd', '4 Orchard Yard', 'VAT number: GB 000 1111 22', 'IBAN: GB82 WEST 1234 5698 7654 32', `Number: ${inv.number}`, 'Billed to']) expect(before).toContain(needle)
    // The office changes its identity, footer and the client's billing address afterwards.
    expect((await admin.request('PUT', '/api/settings/business-identity', { ...(await identity()), legalName: 'Renamed Dogs Ltd', iban: 'DE89370400440532013000' })).status).toBe(200)
    const policy = (await admin.get('/api/settings/invoices')).body.value
    expect((await admin.request('PUT', '/api/settings/invoices', { ...policy, footer: 'A new footer.' })).status).toBe(200)
    expect((await admin.request('PUT', `/api/clients/${CLIENT_A}/billing`, { billingName: 'Fairweather Family Trust', billingAddressLine: '1 Invented Row', billingTown: 'Ashcombe', billingPostcode: 'AC1 1AA', billingCountry: 'GB' })).status).toBe(200)
    const after = await pdfOf(admin, `/api/invoices/${inv.id}/pdf`)
    expect(after).toBe(before)
    // A new invoice carries the new identity and billing address.
    const next = await pdfOf(admin, `/api/invoices/${(await draftAndIssue()).id}/pdf`)
    for (const needle of ['Renamed Dogs Ltd', 'Fairweather Family Trust', '1 Invented Row', 'A new footer.', 'IBAN: DE89 3704 0044 0532 0130 00']) expect(next).toContain(needle)
  })

  it('refuses to issue while the identity is incomplete, using no number; the draft stays a draft', async () => {
    expect((await admin.request('PUT', '/api/settings/business-identity', { ...(await identity()), legalName: '', addressLine1: '' })).status).toBe(200)
    const counter = await query('select last_seq from invoice_counters order by year desc limit 1')
    const draft = await admin.post(`/api/clients/${CLIENT_A}/invoices`, { lines: [{ description: 'Visit', unitMinor: 1000, quantity: 1, taxRateBasisPoints: 0 }] })
    const res = await admin.post(`/api/invoices/${draft.body.id}/issue`)
    expect(res.status).toBe(422)
    expect(res.body.message).toMatch(/legal name.*postal address.*Business identity/)
    expect((await query('select status, number from invoices where id = ?', [draft.body.id]))[0]).toMatchObject({ status: 'draft', number: null })
    expect(await query('select last_seq from invoice_counters order by year desc limit 1')).toEqual(counter)
  })

  it('gives a credit note the number of the invoice it corrects, in its record and its PDF', async () => {
    const inv = await draftAndIssue()
    const note = await admin.post(`/api/invoices/${inv.id}/credit-note`, { reason: 'Visit cancelled by us.' })
    expect(note.status).toBe(201)
    const text = await pdfOf(admin, `/api/invoices/${note.body.id}/pdf`)
    expect(text).toContain('CREDIT NOTE')
    expect(text).toContain(`Corrects invoice ${inv.number}`)
  })
})

describe('receipts', () => {
  it('e-mails a receipt with its lines and PDF; the household sees a plain receipt number', async () => {
    const paid = await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 40200, method: 'bank_transfer', reference: 'BANK REF 1', receivedOn: '2026-11-20' })
    expect(paid.status).toBe(201)
    const number = (await query('select number from invoices where id = ?', [OPEN_A]))[0]!.number as string
    expect(paid.body.payment.receiptNumber).toBe(`R-${number}-1`)
    const mail = await waitForMail(mailUrl, HANDLER_A, 'Receipt for £402.00') as any
    expect(mail.text).toContain(`receipt number is R-${number}-1`)
    expect(mail.text).toContain('1 × Programme instalment 2 of 6')
    expect(mail.attachments[0]).toMatchObject({ contentType: 'application/pdf', filename: `R-${number}-1.pdf` })
    const handler = await signIn(baseUrl, HANDLER_A)
    const detail = (await handler.get(`/api/invoices/${OPEN_A}`)).body
    expect(detail.payments[0]).toMatchObject({ receiptNumber: `R-${number}-1` })
    const text = await pdfOf(handler, `/api/invoices/${OPEN_A}/receipts/${detail.payments[0].id}`)
    expect(text).toContain(`Receipt number: R-${number}-1`)
    expect(text).toContain('paid in full')
    expect((await inbox(mailUrl, HANDLER_A)).length).toBeGreaterThan(0)
  })
})

describe('bad input names the problem and writes nothing', () => {
  it('refuses a wrong IBAN, a tax rate over 100 %, a logo that is not an image, a billing address over the limits, editing an issued invoice', async () => {
    const before = await identity()
    const iban = await admin.request('PUT', '/api/settings/business-identity', { ...before, iban: 'GB82WEST12345698765431' })
    expect(iban.status).toBeGreaterThanOrEqual(400)
    expect(iban.status).toBeLessThan(500)
    expect(JSON.stringify(iban.body)).toMatch(/IBAN is not valid/)
    expect(await identity()).toEqual(before)

    const tax = await admin.post(`/api/clients/${CLIENT_A}/invoices`, { lines: [{ description: 'Visit', unitMinor: 1000, quantity: 1, taxRateBasisPoints: 10_001 }] })
    expect(tax.status).toBe(422)
    expect(JSON.stringify(tax.body)).toMatch(/at most 100 %/)
    const policy = (await admin.get('/api/settings/invoices')).body.value
    expect((await admin.request('PUT', '/api/settings/invoices', { ...policy, defaultTaxRatePercent: 120 })).status).toBe(422)

    const notImage = new FormData()
    notImage.append('file', new Blob([Buffer.from('%PDF-1.4 not a logo')], { type: 'image/png' }), 'logo.png')
    const logo = await admin.request('POST', '/api/business-logo', notImage)
    expect(logo.status).toBe(415)
    expect(logo.body.message).toMatch(/not PNG or JPEG|not PNG/)
    expect((await admin.get('/api/business-logo')).body.logoId).toBeNull()

    const long = await admin.request('PUT', `/api/clients/${CLIENT_A}/billing`, { billingAddressLine: 'x'.repeat(201) })
    expect(long.status).toBe(422)
    expect(JSON.stringify(long.body)).toMatch(/at most 200 characters/)
    expect((await query('select billing_address_line from invoices i join clients c on c.id = i.client_id where i.id = ?', [OPEN_A]))[0]!.billing_address_line).toBeNull()

    const edit = await admin.request('PATCH', `/api/invoices/${OPEN_A}`, { lines: [{ description: 'Changed', unitMinor: 1, quantity: 1, taxRateBasisPoints: 0 }] })
    expect(edit.status).toBe(409)
    expect(edit.body.message).toMatch(/never edited/)
  })

  it('edits a draft and prints a logo on documents issued after it is set', async () => {
    const draft = await admin.post(`/api/clients/${CLIENT_A}/invoices`, { lines: [{ description: 'Visit', unitMinor: 1000, quantity: 1, taxRateBasisPoints: 0 }] })
    const edited = await admin.request('PATCH', `/api/invoices/${draft.body.id}`, { lines: [{ description: 'Two visits', unitMinor: 1000, quantity: 2, taxRateBasisPoints: 2000 }] })
    expect(edited.status, JSON.stringify(edited.body)).toBe(200)
    expect(edited.body).toMatchObject({ netMinor: 2000, taxMinor: 400, grossMinor: 2400 })
    const form = new FormData()
    form.append('file', new Blob([TINY_PNG], { type: 'image/png' }), 'logo.png')
    expect((await admin.request('POST', '/api/business-logo', form)).status).toBe(201)
    const issued = await admin.post(`/api/invoices/${draft.body.id}/issue`)
    expect(issued.status).toBe(200)
    const frozen = (await query('select frozen from invoices where id = ?', [draft.body.id]))[0]!.frozen as string
    expect(JSON.parse(frozen).seller.logoId).toMatch(/^[0-9a-f]{64}$/)
    expect((await pdfOf(admin, `/api/invoices/${draft.body.id}/pdf`))).toContain('Two visits')
  })
})

describe('the accountant\'s export', () => {
  it('lists invoices, credit notes, payments and refunds in the range as RFC 4180 CSV, guarded against formulas', async () => {
    expect((await admin.request('PUT', `/api/clients/${CLIENT_A}/billing`, { billingName: '=SUM(1,2)', billingAddressLine: '1 Invented Row', billingTown: 'Ashcombe' })).status).toBe(200)
    const inv = await draftAndIssue()
    expect((await admin.post(`/api/invoices/${inv.id}/payments`, { amountMinor: 10200, method: 'cash', receivedOn: (await query('select issue_date from invoices where id = ?', [inv.id]))[0]!.issue_date as string })).status).toBe(201)
    const day = (await query('select issue_date from invoices where id = ?', [inv.id]))[0]!.issue_date as string
    const res = await fetch(`${baseUrl}/api/invoices/export.csv?from=${day}&to=${day}`, { headers: { cookie: admin.cookie } })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toContain('text/csv')
    const csv = await res.text()
    const lines = csv.split('\r\n') // RFC 4180 §2.1: records end with CRLF
    expect(lines[0]).toBe('record,number,date,due_date,household,billed_to,currency,net,tax,gross,status,refers_to,method,reference')
    const row = lines.find(l => l.startsWith(`invoice,${inv.number},`))!
    // RFC 4180 §2.6: a field with a comma is quoted; the leading = is neutralised with ' (OWASP, "CSV Injection").
    expect(row).toContain(`,"'=SUM(1,2)",GBP,85.00,17.00,102.00,paid,`)
    expect(lines.some(l => l.startsWith(`payment,R-${inv.number}-1,${day},`) && l.includes(`,102.00,,${inv.number},cash,`))).toBe(true)
    expect(csv.endsWith('\r\n')).toBe(true)
    const bad = await admin.get('/api/invoices/export.csv?from=2026-12-01&to=2026-01-01')
    expect(bad.status).toBe(400)
    expect(bad.body.message).toMatch(/end date is before the start date/)
  })
})
