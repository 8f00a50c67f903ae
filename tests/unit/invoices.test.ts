// Invoice rules: shown state, numbering, which changes each state allows, credit notes mirroring the invoice.
// Every figure is our own arithmetic, worked out beside it.
import { describe, expect, it } from 'vitest'
import {
  addDays, balanceDue, canCredit, canIssue, canVoid, creditLines, formatInvoiceNumber, invoiceTotalsForIssue, shownState,
} from '../../shared/utils/invoices'
import { invoiceTotals } from '../../shared/utils/money'

describe('shownState', () => {
  it('derives overdue only for an open invoice whose due date has passed', () => {
    expect(shownState('open', '2026-03-01', '2026-03-02')).toBe('overdue')
    expect(shownState('open', '2026-03-02', '2026-03-02')).toBe('open') // due today is not yet overdue
    expect(shownState('paid', '2026-01-01', '2026-03-02')).toBe('paid')
    expect(shownState('void', '2026-01-01', '2026-03-02')).toBe('void')
    expect(shownState('draft', null, '2026-03-02')).toBe('draft')
  })
})

describe('formatInvoiceNumber', () => {
  it('pads the yearly sequence and marks credit notes', () => {
    expect(formatInvoiceNumber('invoice', 2026, 1)).toBe('INV-2026-0001')
    expect(formatInvoiceNumber('credit_note', 2026, 42)).toBe('CN-2026-0042')
    expect(formatInvoiceNumber('invoice', 2026, 12345)).toBe('INV-2026-12345')
  })
  it('refuses a bad year or sequence', () => {
    expect(() => formatInvoiceNumber('invoice', 26, 1)).toThrow(RangeError)
    expect(() => formatInvoiceNumber('invoice', 2026, 0)).toThrow(RangeError)
    expect(() => formatInvoiceNumber('invoice', 2026, 1.5)).toThrow(RangeError)
  })
})

describe('state changes', () => {
  it('issues and voids only drafts; credits only open or paid invoices', () => {
    expect(canIssue('draft')).toBe(true)
    expect(canIssue('open')).toBe(false)
    expect(canVoid('draft')).toBe(true)
    for (const s of ['open', 'paid', 'void'] as const) expect(canVoid(s)).toBe(false)
    expect(canCredit('invoice', 'open')).toBe(true)
    expect(canCredit('invoice', 'paid')).toBe(true)
    expect(canCredit('invoice', 'void')).toBe(false)
    expect(canCredit('invoice', 'draft')).toBe(false)
    expect(canCredit('credit_note', 'open')).toBe(false)
  })
})

describe('creditLines', () => {
  it('mirrors each line so net, tax and gross are the exact negatives (tax rounded halves away from zero)', () => {
    // 1243p at 20 % → tax 248.6p → 249p; 10p at 5 % → 0.5p → 1p; so the credit is −1243/−249 and −10/−1.
    const lines = [
      { description: 'Programme instalment', unitMinor: 1243, quantity: 1, taxRateBasisPoints: 2000 },
      { description: 'Treat pouch', unitMinor: 10, quantity: 1, taxRateBasisPoints: 500 },
    ]
    const inv = invoiceTotals(lines)
    const credit = invoiceTotals(creditLines(lines))
    expect(inv).toMatchObject({ netMinor: 1253, taxMinor: 250, grossMinor: 1503 })
    expect(credit).toMatchObject({ netMinor: -1253, taxMinor: -250, grossMinor: -1503 })
    expect(creditLines(lines)[0]!.description).toBe('Credit: Programme instalment')
  })
  it('refuses an invoice totalling below zero but allows a credit note', () => {
    const negative = [{ description: 'Refund', unitMinor: -500, quantity: 1, taxRateBasisPoints: 0 }]
    expect(() => invoiceTotalsForIssue(negative, 'invoice')).toThrow(RangeError)
    expect(invoiceTotalsForIssue(negative, 'credit_note').grossMinor).toBe(-500)
  })
})

describe('balanceDue and addDays', () => {
  it('never owes less than zero', () => {
    expect(balanceDue(36000, 10000)).toBe(26000)
    expect(balanceDue(36000, 36000)).toBe(0)
    expect(balanceDue(36000, 40000)).toBe(0)
  })
  it('adds calendar days across month and leap-year ends (2028 is a leap year)', () => {
    expect(addDays('2026-01-25', 14)).toBe('2026-02-08')
    expect(addDays('2028-02-20', 14)).toBe('2028-03-05') // 20 Feb + 9 = 29 Feb, + 5 = 5 Mar
    expect(addDays('2026-12-25', 14)).toBe('2027-01-08')
    expect(addDays('2026-03-01', 0)).toBe('2026-03-01')
  })
})

describe('agedReceivables', () => {
  it('buckets open balances by days overdue: current, 1-30, 31-60, 61-90, 90+', async () => {
    const { agedReceivables, daysOverdue } = await import('../../shared/utils/invoices')
    const row = (dueDate: string, balanceMinor: number, extra: Record<string, unknown> = {}) => ({ status: 'open' as const, kind: 'invoice' as const, dueDate, currency: 'GBP', balanceMinor, ...extra })
    const today = '2026-06-30'
    expect(daysOverdue('2026-06-30', today)).toBe(0)
    expect(daysOverdue('2026-05-31', today)).toBe(30) // 30 days in June (own arithmetic)
    expect(daysOverdue('2026-07-10', today)).toBe(0)
    const aged = agedReceivables([
      row('2026-07-10', 100), // not yet due
      row('2026-06-30', 200), // due today: current
      row('2026-05-31', 300), // 30 days
      row('2026-05-30', 400), // 31 days
      row('2026-04-01', 500), // 90 days: 30 (Apr 1→May 1) + 31 + 29 = 90
      row('2026-03-31', 600), // 91 days
      row('2026-01-01', 700, { status: 'paid' }), // paid: not owed
      row('2026-01-01', -50, { kind: 'credit_note' }), // credit notes are not receivables
    ], today)
    expect(aged).toEqual({ GBP: { 'current': 300, '1-30': 300, '31-60': 400, '61-90': 500, '90+': 600 } })
  })
})
