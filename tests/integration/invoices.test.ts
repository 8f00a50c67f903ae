// Invoices end to end against the built server: drafting, gap-free numbering under concurrency, what each person sees,
// credit notes instead of edits, manual payments with receipts, and bad input leaving everything unchanged.
import { createClient as libsql } from '@libsql/client'
import { PDFDocument } from 'pdf-lib'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { inbox, signIn, waitForMail, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')
const OPEN_A = seedId('invoice:fair-2') // seeded: £250 + £85 at 20 % VAT, open
const DRAFT_LINDGREN = seedId('invoice:lind-visit')

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const one = async (sql: string, args: (string | number)[] = []) => (await query(sql, args))[0]!

let admin: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  admin = await signIn(baseUrl, ADMIN)
})

async function draft(lines = [{ description: 'Extra session', unitMinor: 4500, quantity: 2, taxRateBasisPoints: 2000 }]) {
  const res = await admin.post(`/api/clients/${CLIENT_A}/invoices`, { lines })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { id: string, grossMinor: number, status: string }
}

describe('drafting and issuing', () => {
  it('prices lines with tax per line and keeps drafts from the household', async () => {
    // 2 × 4500p = 9000p net, 20 % = 1800p tax, 10800p gross (own arithmetic).
    const d = await draft()
    expect(d).toMatchObject({ status: 'draft', grossMinor: 10800 })
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.get(`/api/invoices/${d.id}`)).status).toBe(404)
    expect((await handler.get('/api/invoices')).body.rows.some((r: any) => r.id === d.id)).toBe(false)
    expect((await admin.get(`/api/invoices/${d.id}`)).body.lines).toHaveLength(1)
  })

  it('numbers invoices in sequence without gaps, also when two are issued at once, and e-mails the household', async () => {
    const year = new Date().getUTCFullYear()
    const before = Number((await one('select coalesce(max(last_seq), 0) n from invoice_counters where year = ?', [year])).n)
    const [a, b, c] = [await draft(), await draft(), await draft()]
    const results = await Promise.all([a, b, c].map(d => admin.post(`/api/invoices/${d.id}/issue`)))
    for (const r of results) expect(r.status, JSON.stringify(r.body)).toBe(200)
    const numbers = results.map(r => r.body.number as string).sort()
    const pad = (n: number) => `INV-${year}-${String(n).padStart(4, '0')}`
    expect(numbers).toEqual([pad(before + 1), pad(before + 2), pad(before + 3)])
    // Issuing again is refused and uses no number.
    const again = await admin.post(`/api/invoices/${a.id}/issue`)
    expect(again.status).toBe(409)
    expect(Number((await one('select last_seq n from invoice_counters where year = ?', [year])).n)).toBe(before + 3)
    const mail = await waitForMail(mailUrl, HANDLER_A, numbers[0])
    expect(mail.text).toContain('/handler/invoices/')
    // The household now sees them; the other household and the other trainer do not.
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.get(`/api/invoices/${a.id}`)).status).toBe(200)
    expect((await (await signIn(baseUrl, HANDLER_B)).get(`/api/invoices/${a.id}`)).status).toBe(404)
    expect((await (await signIn(baseUrl, TRAINER_B)).get(`/api/invoices/${a.id}`)).status).toBe(404)
    expect((await (await signIn(baseUrl, TRAINER_A)).get(`/api/invoices/${a.id}`)).status).toBe(200)
  })

  it('refuses bad lines with field errors and writes nothing', async () => {
    const count = async () => Number((await one('select count(*) n from invoices')).n)
    const n = await count()
    for (const bad of [
      { lines: [{ description: 'Half a penny', unitMinor: 12.5, quantity: 1 }] },
      { lines: [{ description: 'Negative', unitMinor: -100, quantity: 1 }] },
      { lines: [{ description: 'Too taxed', unitMinor: 100, quantity: 1, taxRateBasisPoints: 10001 }] },
      { lines: [] },
      { currency: 'ZZZ', lines: [{ description: 'x', unitMinor: 100, quantity: 1 }] },
    ]) {
      const res = await admin.post(`/api/clients/${CLIENT_A}/invoices`, bad)
      expect(res.status, JSON.stringify(bad)).toBe(422)
      expect(Object.keys(res.body.data.fieldErrors).length).toBeGreaterThan(0)
    }
    expect(await count()).toBe(n)
  })
})

describe('credit notes and voiding', () => {
  it('credits an open invoice with a numbered credit note and voids it; a second credit is refused', async () => {
    const res = await admin.post(`/api/invoices/${OPEN_A}/credit-note`, { reason: 'Visit cancelled by us.' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    // 25000 + 8500 = 33500p net, 20 % = 6700p tax, 40200p gross; the credit note is its mirror (own arithmetic).
    expect(res.body).toMatchObject({ kind: 'credit_note', grossMinor: -40200, taxMinor: -6700, creditsInvoiceId: OPEN_A })
    expect(res.body.number).toMatch(/^CN-\d{4}-\d{4}$/)
    expect((await admin.get(`/api/invoices/${OPEN_A}`)).body.status).toBe('void')
    expect((await admin.post(`/api/invoices/${OPEN_A}/credit-note`, { reason: 'Again' })).status).toBe(409)
  })

  it('voids only drafts: an issued invoice is refused with a message pointing to credit notes', async () => {
    const res = await admin.post(`/api/invoices/${OPEN_A}/void`)
    expect(res.status).toBe(409)
    expect(res.body.message).toMatch(/credit note/)
    expect((await admin.post(`/api/invoices/${DRAFT_LINDGREN}/void`)).body.status).toBe('void')
  })
})

describe('manual payments', () => {
  it('records part and then full payment, marks the invoice paid and e-mails a receipt each time', async () => {
    const part = await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 20000, method: 'bank_transfer', reference: 'FAIR 2', receivedOn: '2026-11-20' })
    expect(part.status, JSON.stringify(part.body)).toBe(201)
    expect(part.body.invoice).toMatchObject({ status: 'open', paidMinor: 20000 })
    const rest = await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 20200, method: 'cash', receivedOn: '2026-11-21' })
    expect(rest.status).toBe(201)
    expect(rest.body.invoice).toMatchObject({ status: 'paid', paidMinor: 40200 })
    await waitForMail(mailUrl, HANDLER_A, 'Receipt for £202.00')
    // One receipt per payment (the inbox is shared with other test files, so match these two amounts exactly).
    const subjects = (await inbox(mailUrl, HANDLER_A)).map(m => m.subject)
    expect(subjects.filter(s => s.startsWith('Receipt for £200.00 ')).length).toBe(1)
    expect(subjects.filter(s => s.startsWith('Receipt for £202.00 ')).length).toBe(1)
    // Paying a paid invoice is refused and records nothing.
    const again = await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 1, method: 'cash', receivedOn: '2026-11-21' })
    expect(again.status).toBe(409)
    expect(Number((await one('select count(*) n from invoice_payments where invoice_id = ?', [OPEN_A])).n)).toBe(2)
    // The roster's balance column no longer counts it.
    const roster = await admin.get('/api/clients?pageSize=50')
    const fair = roster.body.rows.find((r: any) => r.id === CLIENT_A)
    expect(fair.extras.balance).toBeUndefined()
  })

  it('refuses more than is owed, fractions of a penny and negatives, leaving the invoice unchanged', async () => {
    for (const [body, status] of [
      [{ amountMinor: 40201, method: 'cash', receivedOn: '2026-11-20' }, 422],
      [{ amountMinor: 100.5, method: 'cash', receivedOn: '2026-11-20' }, 422],
      [{ amountMinor: -100, method: 'cash', receivedOn: '2026-11-20' }, 422],
      [{ amountMinor: 100, method: 'card', receivedOn: '2026-11-20' }, 422],
      [{ amountMinor: 100, method: 'cash', receivedOn: '2026-02-30' }, 422],
    ] as const) {
      const res = await admin.post(`/api/invoices/${OPEN_A}/payments`, body)
      expect(res.status, JSON.stringify(body)).toBe(status)
    }
    const row = await one('select status, paid_minor from invoices where id = ?', [OPEN_A])
    expect(row).toMatchObject({ status: 'open', paid_minor: 0 })
    const roster = await admin.get('/api/clients?pageSize=50')
    expect(roster.body.rows.find((r: any) => r.id === CLIENT_A).extras.balance).toMatchObject({ owedMinor: 40200, currency: 'GBP' })
  })
})

describe('PDF invoice', () => {
  it('downloads an issued invoice as a PDF titled with its number; a draft is not the household\'s', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const res = await fetch(`${baseUrl}/api/invoices/${OPEN_A}/pdf`, { headers: { cookie: handler.cookie } })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toContain('application/pdf')
    const bytes = new Uint8Array(await res.arrayBuffer())
    expect(new TextDecoder().decode(bytes.slice(0, 5))).toBe('%PDF-')
    const doc = await PDFDocument.load(bytes)
    const number = (await admin.get(`/api/invoices/${OPEN_A}`)).body.number as string
    expect(doc.getTitle()).toBe(`Invoice ${number}`)
    expect(doc.getPageCount()).toBe(1)
    expect(res.headers.get('content-disposition')).toContain(`${number}.pdf`)
    const draftPdf = await fetch(`${baseUrl}/api/invoices/${DRAFT_LINDGREN}/pdf`, { headers: { cookie: handler.cookie } })
    expect(draftPdf.status).toBe(404)
  })
})
