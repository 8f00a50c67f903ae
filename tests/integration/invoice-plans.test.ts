// Fee schedules and the invoices created from them: set up by the office (bad input refused, nothing written), the
// plan invoiced when a programme starts (deposit issued with its PDF attached, instalments scheduled), once only,
// instalments issued on their day and overdue reminders once per interval by the invoice job (driven through its
// "run now" route), revenue per month, and the Bad input list of issue 6 that the other files do not cover.
import { createClient as libsql } from '@libsql/client'
import { PDFDocument } from 'pdf-lib'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { inbox, signIn, waitForMail, type Agent } from '../support/http'
import { ADMIN, HANDLER_A, HANDLER_B, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')
const TEMPLATE = seedId('template:default')
const BRENNAN = seedId('client:brennan') // trainer2's client at intake: no programme, no invoices
const BRENNAN_HANDLER = 'orla.brennan@example.test'
const LINDGREN = seedId('client:lindgren') // has a programme-less file and one hand-made draft
const OPEN_A = seedId('invoice:fair-2') // seeded: 40200p open, due in 8 days

async function query(sql: string, args: (string | number | null)[] = []) {
  const db = libsql({ url: databaseUrl })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const one = async (sql: string, args: (string | number | null)[] = []) => (await query(sql, args))[0]!
const isoDay = (d: Date) => d.toISOString().slice(0, 10)
const daysFromToday = (n: number) => isoDay(new Date(Date.now() + n * 86_400_000))

let admin: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  admin = await signIn(baseUrl, ADMIN)
})

const schedule = { currency: 'GBP', taxRateBasisPoints: 2000, depositMinor: 60000, instalmentCount: 6, intervalMonths: 1, lines: [{ description: 'Placement programme', unitMinor: 210000 }] }

describe('fee schedules', () => {
  it('lists the seeded schedule and saves a new one; bad input is refused with field errors and writes nothing', async () => {
    const list = await admin.get('/api/fee-schedules')
    expect(list.status).toBe(200)
    const seeded = list.body.rows.find((r: any) => r.id === TEMPLATE)
    expect(seeded.schedule).toMatchObject({ currency: 'GBP', depositMinor: 60000, instalmentCount: 6 })
    expect(list.body.currency).toBe('GBP')

    const before = await one('select updated_at, deposit_minor from fee_schedules where template_id = ?', [TEMPLATE])
    for (const [bad, field] of [
      [{ ...schedule, depositMinor: 210001 }, 'depositMinor'],
      [{ ...schedule, lines: [{ description: 'Half a penny', unitMinor: 100.5 }] }, 'lines.0.unitMinor'],
      [{ ...schedule, lines: [{ description: 'Negative', unitMinor: -1 }] }, 'lines.0.unitMinor'],
      [{ ...schedule, currency: 'ZZZ' }, 'currency'],
      [{ ...schedule, instalmentCount: 0 }, 'instalmentCount'],
      [{ ...schedule, lines: [] }, 'lines'],
      [{ ...schedule, taxRateBasisPoints: 10001 }, 'taxRateBasisPoints'],
    ] as const) {
      const res = await admin.request('PUT', `/api/fee-schedules/${TEMPLATE}`, bad)
      expect(res.status, JSON.stringify(bad)).toBe(422)
      expect(Object.keys(res.body.data.fieldErrors)).toContain(field)
    }
    expect(await one('select updated_at, deposit_minor from fee_schedules where template_id = ?', [TEMPLATE])).toEqual(before)
    expect((await admin.request('PUT', '/api/fee-schedules/no-such-template', schedule)).status).toBe(404)

    const saved = await admin.request('PUT', `/api/fee-schedules/${TEMPLATE}`, { ...schedule, depositMinor: 50000, lines: [...schedule.lines, { description: 'Scent sample kit', unitMinor: 4000, taxRateBasisPoints: 0 }] })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    expect(saved.body).toMatchObject({ depositMinor: 50000, lines: [{ taxRateBasisPoints: null }, { taxRateBasisPoints: 0 }] })
    expect(Number((await one('select count(*) n from fee_schedules')).n)).toBe(1)
  })
})

describe('plan invoices', () => {
  it('invoices the plan when a programme starts: the deposit issued and e-mailed with its PDF, instalments scheduled, once only', async () => {
    const trainer = await signIn(baseUrl, TRAINER_B)
    const started = await trainer.post(`/api/clients/${BRENNAN}/programme`, { templateId: TEMPLATE })
    expect(started.status, JSON.stringify(started.body)).toBe(201)

    const rows = await query('select plan_part, status, number, issue_date, scheduled_issue_on, net_minor, tax_minor, gross_minor from invoices where client_id = ? order by scheduled_issue_on, plan_part', [BRENNAN])
    expect(rows.map(r => r.plan_part)).toEqual(['deposit', 'instalment:1', 'instalment:2', 'instalment:3', 'instalment:4', 'instalment:5', 'instalment:6'])
    const [deposit, ...instalments] = rows
    expect(deposit).toMatchObject({ status: 'open', net_minor: 60000, tax_minor: 12000, gross_minor: 72000 })
    expect(String(deposit!.number)).toMatch(/^INV-\d{4}-\d{4}$/)
    // Instalments: (210000 − 60000) / 6 = 25000 net each, drafts with their issue dates one month apart (own arithmetic).
    expect(instalments.every(r => r.status === 'draft' && r.number === null && r.net_minor === 25000)).toBe(true)
    const dates = instalments.map(r => String(r.scheduled_issue_on))
    expect([...dates].sort()).toEqual(dates)
    expect(new Set(dates.map(d => d.slice(0, 7))).size).toBe(6)
    expect(rows.reduce((a, r) => a + Number(r.net_minor), 0)).toBe(210000)

    // The household gets the deposit invoice with the PDF attached.
    const mail = await waitForMail(mailUrl, BRENNAN_HANDLER, String(deposit!.number)) as Awaited<ReturnType<typeof waitForMail>> & { attachments: Array<{ filename: string, contentType: string, size: number }> }
    expect(mail.attachments).toHaveLength(1)
    expect(mail.attachments[0]).toMatchObject({ filename: `${deposit!.number}.pdf`, contentType: 'application/pdf' })
    const bytes = new Uint8Array(await (await fetch(`${mailUrl}/api/messages/${mail.id}/attachments/0`)).arrayBuffer())
    expect(new TextDecoder().decode(bytes.slice(0, 5))).toBe('%PDF-')
    expect((await PDFDocument.load(bytes)).getTitle()).toBe(`Invoice ${deposit!.number}`)

    // By hand as well: refused, nothing added; a second programme start is refused by training and adds nothing.
    const again = await admin.post(`/api/clients/${BRENNAN}/plan-invoices`, { templateId: TEMPLATE, startDate: daysFromToday(0) })
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(/already exist/)
    expect((await trainer.post(`/api/clients/${BRENNAN}/programme`, { templateId: TEMPLATE })).status).toBe(409)
    expect(Number((await one('select count(*) n from invoices where client_id = ?', [BRENNAN])).n)).toBe(7)
  })

  it('creates a plan by hand once even when asked twice at once, and refuses a template without fees', async () => {
    const start = daysFromToday(-40) // the deposit and the first instalment are already due: both issued now
    const [a, b] = await Promise.all([
      admin.post(`/api/clients/${LINDGREN}/plan-invoices`, { templateId: TEMPLATE, startDate: start }),
      admin.post(`/api/clients/${LINDGREN}/plan-invoices`, { templateId: TEMPLATE, startDate: start }),
    ])
    expect([a.status, b.status].sort()).toEqual([201, 409])
    const rows = await query('select plan_part, status from invoices where client_id = ? and fee_schedule_id is not null', [LINDGREN])
    expect(rows).toHaveLength(7)
    expect(rows.filter(r => r.status === 'open').map(r => r.plan_part).sort()).toEqual(['deposit', 'instalment:1'])

    await query('delete from fee_schedules')
    const none = await admin.post(`/api/clients/${BRENNAN}/plan-invoices`, { templateId: TEMPLATE, startDate: start })
    expect(none.status).toBe(422)
    expect(none.body.message).toMatch(/no fee schedule/)
    expect((await admin.post(`/api/clients/${BRENNAN}/plan-invoices`, { templateId: TEMPLATE, startDate: '2026-02-30' })).status).toBe(422)
    // Without fees a programme still starts, and no invoice is made.
    expect((await admin.post(`/api/clients/${BRENNAN}/programme`, { templateId: TEMPLATE })).status).toBe(201)
    expect(Number((await one('select count(*) n from invoices where client_id = ?', [BRENNAN])).n)).toBe(0)
  })
})

describe('the invoice job', () => {
  it('issues a scheduled instalment on its day, numbered and e-mailed, once', async () => {
    const id = seedId('invoice:achterberg:instalment:1')
    expect(await one('select status from invoices where id = ?', [id])).toMatchObject({ status: 'draft' })
    await query('update invoices set scheduled_issue_on = ? where id = ?', [daysFromToday(-1), id])
    const run = await admin.post('/api/invoices/run-schedule')
    expect(run.status).toBe(200)
    expect(run.body.issued).toBe(1)
    const row = await one('select status, number, scheduled_issue_on from invoices where id = ?', [id])
    expect(row).toMatchObject({ status: 'open', scheduled_issue_on: null })
    const mail = await waitForMail(mailUrl, HANDLER_B, String(row.number)) as any
    expect(mail.attachments[0].contentType).toBe('application/pdf')
    expect((await admin.post('/api/invoices/run-schedule')).body.issued).toBe(0)
  })

  it('reminds the household of an overdue invoice once per policy interval and records when', async () => {
    const reminders = async () => (await inbox(mailUrl, HANDLER_A)).filter(m => m.subject.startsWith('Reminder: invoice') && m.text.includes(OPEN_A))
    const seen = (await reminders()).length
    // The seed's long-overdue Moreau invoice has had all its reminders (tested below); this test follows one invoice.
    await query('update invoices set reminders_sent = 3 where id = ?', [seedId('invoice:moreau-5')])
    // Two days overdue: before the first reminder (3 days, the policy default).
    await query('update invoices set due_date = ? where id = ?', [daysFromToday(-2), OPEN_A])
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(0)
    // Three days: the first reminder; running again in the same interval sends nothing more.
    await query('update invoices set due_date = ? where id = ?', [daysFromToday(-3), OPEN_A])
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(1)
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(0)
    const first = await waitForMail(mailUrl, HANDLER_A, 'Reminder: invoice')
    expect(first.text).toContain('£402.00 is still to pay')
    expect(await one('select reminders_sent from invoices where id = ?', [OPEN_A])).toMatchObject({ reminders_sent: 1 })
    const listed = (await admin.get('/api/invoices')).body.rows.find((r: any) => r.id === OPEN_A)
    expect(listed.lastRemindedAt).toBeTruthy()
    expect(listed.remindersSent).toBe(1)
    // A week later (10 days overdue, the last reminder 7 days ago): the second reminder.
    await query('update invoices set due_date = ?, last_reminded_at = ? where id = ?', [daysFromToday(-10), Date.now() - 7 * 86_400_000, OPEN_A])
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(1)
    expect(await one('select reminders_sent from invoices where id = ?', [OPEN_A])).toMatchObject({ reminders_sent: 2 })
    const deadline = Date.now() + 10_000
    while ((await reminders()).length < seen + 2 && Date.now() < deadline) await new Promise(r => setTimeout(r, 150))
    expect((await reminders()).length).toBe(seen + 2)
    // Paid or with reminders turned off: none.
    const off = await admin.request('PUT', '/api/settings/invoice-reminders', { enabled: false, firstAfterDaysOverdue: 3, intervalDays: 7, maxReminders: 3 })
    expect(off.status, JSON.stringify(off.body)).toBe(200)
    await query('update invoices set due_date = ? where id = ?', [daysFromToday(-17), OPEN_A])
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(0)
  })
})

describe('reminders reach every overdue invoice', () => {
  it('reminds invoices 4, 11, 36 and 400 days overdue (never reminded) once, oldest first, and not the 2-day one', async () => {
    // Policy defaults (common practice): first after 3 days, then every 7, at most 3. The seed's Moreau invoice was
    // issued 50 days ago with 14 days to pay: 36 days overdue and never reminded (it used to be skipped for good).
    const MOREAU_36 = seedId('invoice:moreau-5')
    expect(await one('select due_date, reminders_sent from invoices where id = ?', [MOREAU_36])).toMatchObject({ due_date: daysFromToday(-36), reminders_sent: 0 })
    const fair = await one('select client_id from invoices where id = ?', [OPEN_A])
    for (const [i, d] of [2, 4, 11, 400].entries()) {
      await query(`insert into invoices (id, client_id, kind, status, number, number_year, number_seq, currency, issue_date, due_date, net_minor, tax_minor, gross_minor, paid_minor, due_in_days)
        values (?, ?, 'invoice', 'open', ?, 1999, ?, 'GBP', ?, ?, 10000, 2000, 12000, 0, 14)`, [`overdue-${d}`, String(fair.client_id), `INV-1999-${String(i + 1).padStart(4, '0')}`, i + 1, daysFromToday(-d - 14), daysFromToday(-d)])
    }
    const sentCounts = async () => Object.fromEntries((await query(`select id, reminders_sent from invoices where id like 'overdue-%' or id = ?`, [MOREAU_36])).map(r => [r.id, r.reminders_sent]))
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(4)
    expect(await sentCounts()).toEqual({ 'overdue-400': 1, [MOREAU_36]: 1, 'overdue-11': 1, 'overdue-4': 1, 'overdue-2': 0 })
    const mail = await waitForMail(mailUrl, HANDLER_A, 'INV-1999-0004')
    expect(mail.subject).toBe('Reminder: invoice INV-1999-0004 is overdue')
    // The same day again: nothing more (the next waits an interval).
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(0)
    // A week on: the 36- and 11-day ones get their second (its day, 10, has passed); the 4-day one waits for day 10;
    // one already at the maximum (3) gets none.
    await query(`update invoices set last_reminded_at = ? where id like 'overdue-%' or id = ?`, [Date.now() - 7 * 86_400_000, MOREAU_36])
    await query('update invoices set reminders_sent = 3 where id = ?', ['overdue-400'])
    expect((await admin.post('/api/invoices/run-schedule')).body.reminded).toBe(2)
    expect(await sentCounts()).toEqual({ 'overdue-400': 3, [MOREAU_36]: 2, 'overdue-11': 2, 'overdue-4': 1, 'overdue-2': 0 })
  })
})

describe('revenue by month', () => {
  it('sums payments received per month over the last 12 months, and counts a new payment in this month', async () => {
    const before = await admin.get('/api/invoices/revenue')
    expect(before.status).toBe(200)
    expect(before.body.months).toHaveLength(12)
    const from = `${before.body.months[0]}-01`
    const expected = Number((await one('select coalesce(sum(amount_minor), 0) n from invoice_payments where received_on >= ?', [from])).n)
    expect((before.body.byCurrency.GBP as number[]).reduce((a, b) => a + b, 0)).toBe(expected)
    const today = (await admin.get('/api/invoices')).body.today as string
    const paid = await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 1000, method: 'cash', receivedOn: today })
    expect(paid.status).toBe(201)
    const after = await admin.get('/api/invoices/revenue')
    expect(after.body.byCurrency.GBP[11] - (before.body.byCurrency.GBP?.[11] ?? 0)).toBe(1000)
  })
})

describe('bad input on payments (issue 6)', () => {
  it('refuses paying a void invoice and another household\'s invoice; the invoice stays as it was', async () => {
    const handlerB = await signIn(baseUrl, HANDLER_B)
    const other = await handlerB.post(`/api/invoices/${OPEN_A}/checkout`)
    expect(other.status).toBe(404)
    expect((await handlerB.get(`/api/invoices/${OPEN_A}`)).status).toBe(404)
    expect(await one('select status, paid_minor from invoices where id = ?', [OPEN_A])).toMatchObject({ status: 'open', paid_minor: 0 })

    expect((await admin.post(`/api/invoices/${OPEN_A}/credit-note`, { reason: 'Programme paused by us.' })).status).toBe(201)
    const handlerA = await signIn(baseUrl, HANDLER_A)
    const pay = await handlerA.post(`/api/invoices/${OPEN_A}/checkout`)
    expect(pay.status).toBe(409)
    expect(pay.body.message).toMatch(/void/)
    const manual = await admin.post(`/api/invoices/${OPEN_A}/payments`, { amountMinor: 100, method: 'cash', receivedOn: '2026-11-20' })
    expect(manual.status).toBe(409)
    expect(await one('select status, paid_minor from invoices where id = ?', [OPEN_A])).toMatchObject({ status: 'void', paid_minor: 0 })
    expect(Number((await one('select count(*) n from invoice_payments where invoice_id = ?', [OPEN_A])).n)).toBe(0)
  })
})
