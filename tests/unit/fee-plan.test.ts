import { describe, expect, it } from 'vitest'
import { addMonths, allocateTax, buildFeePlan, feeScheduleQuote, lastMonths, nextReminderDue, revenueByMonth } from '../../shared/utils/fee-plan'
import { creditLines } from '../../shared/utils/invoices'
import { invoiceTotals, lineTotals, parsePercent } from '../../shared/utils/money'
import { feeScheduleFormSchema, feeScheduleSchema, invoiceDraftFormSchema } from '../../shared/schemas/fee-schedules'

// Check values below are our own arithmetic on invented fees unless marked otherwise.
const sum = (xs: number[]) => xs.reduce((a, b) => a + b, 0)

describe('addMonths', () => {
  it('keeps the day of the month and clamps to the month end', () => {
    expect(addMonths('2026-03-15', 1)).toBe('2026-04-15')
    expect(addMonths('2026-01-31', 1)).toBe('2026-02-28')
    // 2028 is a leap year (Gregorian rule: divisible by 4, not by 100 unless by 400; from memory).
    expect(addMonths('2028-01-31', 1)).toBe('2028-02-29')
    expect(addMonths('2026-11-30', 3)).toBe('2027-02-28')
    expect(addMonths('2026-01-15', -2)).toBe('2025-11-15')
  })
})

describe('buildFeePlan', () => {
  const schedule = {
    lines: [{ description: 'Placement programme', unitMinor: 210000, taxRateBasisPoints: null }],
    taxRateBasisPoints: 2000, depositMinor: 60000, instalmentCount: 6, intervalMonths: 1,
  }

  it('puts the deposit first on the start date and instalments monthly after it', () => {
    const plan = buildFeePlan(schedule, '2026-01-31')
    expect(plan.map(p => p.part)).toEqual(['deposit', 'instalment:1', 'instalment:2', 'instalment:3', 'instalment:4', 'instalment:5', 'instalment:6'])
    expect(plan.map(p => p.issueOn)).toEqual(['2026-01-31', '2026-02-28', '2026-03-31', '2026-04-30', '2026-05-31', '2026-06-30', '2026-07-31'])
    expect(plan[0]!.netMinor).toBe(60000)
    // (210000 − 60000) / 6 = 25000 each.
    expect(plan.slice(1).map(p => p.netMinor)).toEqual([25000, 25000, 25000, 25000, 25000, 25000])
    // 25000 × 20 % = 5000 exactly: nothing to distribute.
    expect(plan[1]!.lines[0]).toEqual({ description: 'Instalment 1 of 6: Placement programme', unitMinor: 25000, quantity: 1, taxRateBasisPoints: 2000, allocatedTaxMinor: 5000 })
  })

  it('adds up to the price list exactly, the odd units on the earliest instalments', () => {
    const plan = buildFeePlan({ ...schedule, lines: [{ description: 'Programme', unitMinor: 100001, taxRateBasisPoints: null }], depositMinor: 1, instalmentCount: 3 }, '2026-05-01')
    // 100000 into 3: 33334, 33333, 33333.
    expect(plan.map(p => p.netMinor)).toEqual([1, 33334, 33333, 33333])
    expect(sum(plan.map(p => p.netMinor))).toBe(100001)
  })

  it('takes the deposit from the lines in order and keeps each line at its own tax rate', () => {
    const plan = buildFeePlan({
      lines: [
        { description: 'Assessment visit', unitMinor: 15000, taxRateBasisPoints: null },
        { description: 'Training programme', unitMinor: 180000, taxRateBasisPoints: null },
        { description: 'Scent sample kit', unitMinor: 4001, taxRateBasisPoints: 0 },
      ],
      taxRateBasisPoints: 2000, depositMinor: 40000, instalmentCount: 4, intervalMonths: 2,
    }, '2026-02-10')
    expect(plan[0]!.lines.map(l => [l.description, l.unitMinor, l.taxRateBasisPoints])).toEqual([
      ['Deposit: Assessment visit', 15000, 2000], ['Deposit: Training programme', 25000, 2000],
    ])
    // Programme rest 155000 / 4 = 38750; kit 4001 / 4 → 1001, 1000, 1000, 1000.
    expect(plan[1]!.lines.map(l => [l.unitMinor, l.taxRateBasisPoints])).toEqual([[38750, 2000], [1001, 0]])
    expect(plan[2]!.lines.map(l => l.unitMinor)).toEqual([38750, 1000])
    expect(plan.map(p => p.issueOn)).toEqual(['2026-02-10', '2026-04-10', '2026-06-10', '2026-08-10', '2026-10-10'])
    const perLine = (name: string) => sum(plan.flatMap(p => p.lines.filter(l => l.description.endsWith(name)).map(l => l.unitMinor)))
    expect([perLine('Assessment visit'), perLine('Training programme'), perLine('Scent sample kit')]).toEqual([15000, 180000, 4001])
    // 38750 × 20 % = 7750 exactly; the kit is at 0 %.
    expect(invoiceTotals(plan[1]!.lines).taxMinor).toBe(7750)
    // Quote: tax 15000 × 20 % + 180000 × 20 % + 0 = 3000 + 36000 = 39000; gross 199001 + 39000 = 238001.
    const quote = feeScheduleQuote({ lines: [{ description: 'a', unitMinor: 15000, taxRateBasisPoints: null }, { description: 'b', unitMinor: 180000, taxRateBasisPoints: null }, { description: 'c', unitMinor: 4001, taxRateBasisPoints: 0 }], taxRateBasisPoints: 2000 })
    expect([quote.netMinor, quote.taxMinor, quote.grossMinor]).toEqual([199001, 39000, 238001])
    expect(sum(plan.map(p => invoiceTotals(p.lines).grossMinor))).toBe(238001)
  })

  it('has no deposit invoice for a zero deposit and refuses a deposit above the total', () => {
    expect(buildFeePlan({ ...schedule, depositMinor: 0 }, '2026-01-01')[0]!.part).toBe('instalment:1')
    expect(() => buildFeePlan({ ...schedule, depositMinor: 210001 }, '2026-01-01')).toThrow(/deposit cannot be more/)
    // The deposit covers it all: no empty instalments.
    expect(buildFeePlan({ ...schedule, depositMinor: 210000 }, '2026-01-01').map(p => p.part)).toEqual(['deposit'])
  })
})

describe('tax on a plan adds up to the quote (largest remainder)', () => {
  const plan = (unitMinor: number, rate: number, instalmentCount: number, depositMinor = 0) =>
    buildFeePlan({ lines: [{ description: 'Programme', unitMinor, taxRateBasisPoints: null }], taxRateBasisPoints: rate, depositMinor, instalmentCount, intervalMonths: 1 }, '2026-01-15')

  it('£1,200.00 + 20 % in 7 instalments: tax £240.00 exactly, not £240.02', () => {
    const p = plan(120000, 2000, 7)
    // 120000 / 7 = 17142 r 6: six of 17143 and one of 17142.
    expect(p.map(x => x.netMinor)).toEqual([17143, 17143, 17143, 17143, 17143, 17143, 17142])
    // Exact tax 3428.6 (×6) and 3428.4: floors 7 × 3428 = 23996; 4 pence missing go to the largest fractions (.6),
    // the earliest first: 3429 × 4, 3428 × 3 = 24000.
    const taxes = p.map(x => invoiceTotals(x.lines).taxMinor)
    expect(taxes).toEqual([3429, 3429, 3429, 3429, 3428, 3428, 3428])
    expect(sum(taxes)).toBe(24000)
    expect(p.map(x => invoiceTotals(x.lines).grossMinor)).toEqual([20572, 20572, 20572, 20572, 20571, 20571, 20570])
    expect(sum(p.map(x => invoiceTotals(x.lines).grossMinor))).toBe(144000)
    // Rounding each instalment on its own (the old way) gives 6 × 3429 + 3428 = 24002.
    expect(sum(p.map(x => lineTotals({ unitMinor: x.netMinor, quantity: 1, taxRateBasisPoints: 2000 }).taxMinor))).toBe(24002)
  })

  it('£100.01 + 17.5 % in 3: the quote rounds 1750.175 to 1750; per instalment would give 1749', () => {
    const p = plan(10001, 1750, 3)
    // 3334, 3334, 3333 → exact 583.45, 583.45, 583.275: floors 1749, one penny to the first .45.
    expect(p.map(x => invoiceTotals(x.lines).taxMinor)).toEqual([584, 583, 583])
    expect(sum(p.map(x => invoiceTotals(x.lines).grossMinor))).toBe(feeScheduleQuote({ lines: [{ description: 'Programme', unitMinor: 10001, taxRateBasisPoints: null }], taxRateBasisPoints: 1750 }).grossMinor)
    expect(sum(p.map(x => lineTotals({ unitMinor: x.netMinor, quantity: 1, taxRateBasisPoints: 1750 }).taxMinor))).toBe(1749)
  })

  it('with a deposit the deposit takes its share too: £999.99 + 20 %, deposit £333.33, 2 instalments', () => {
    const p = plan(99999, 2000, 2, 33333)
    // Parts 33333, 33333, 33333 → exact 6666.6 each; quote 19999.8 → 20000; floors 19998: +1 to the first two.
    expect(p.map(x => invoiceTotals(x.lines).taxMinor)).toEqual([6667, 6667, 6666])
    expect(sum(p.map(x => invoiceTotals(x.lines).grossMinor))).toBe(99999 + 20000)
  })

  it('a yen plan (no minor digits) adds up too: ¥10,000 + 10 % in 3', () => {
    const p = plan(10000, 1000, 3)
    // 3334, 3333, 3333 → 333.4, 333.3, 333.3: floors 999, the missing yen to the first.
    expect(p.map(x => invoiceTotals(x.lines).taxMinor)).toEqual([334, 333, 333])
  })

  it('allocateTax: each share is its exact tax rounded down or up, ties to the earlier part', () => {
    expect(allocateTax([], 2000)).toEqual([])
    expect(allocateTax([0, 0], 2000)).toEqual([0, 0])
    expect(allocateTax([12345], 2000)).toEqual([2469]) // one part: the whole line's tax
    expect(allocateTax([5, 5], 1000)).toEqual([1, 0]) // 0.5 + 0.5 = 1: the earlier part takes it
    expect(allocateTax([3, 3, 3], 0)).toEqual([0, 0, 0])
    expect(allocateTax([1, 1, 1], 5000)).toEqual([1, 1, 0]) // quote 1.5 → 2 (halves away from zero)
    expect(() => allocateTax([-1, 2], 2000)).toThrow(/0 or more/)
  })

  it('an invoice line refuses an allocated tax further than a rounding from the exact tax', () => {
    // 17143 × 20 % = 3428.6: 3428 and 3429 are allowed, 3427 and 3430 are not.
    const line = { unitMinor: 17143, quantity: 1, taxRateBasisPoints: 2000 }
    expect(lineTotals({ ...line, allocatedTaxMinor: 3428 }).grossMinor).toBe(20571)
    expect(lineTotals({ ...line, allocatedTaxMinor: 3429 }).taxMinor).toBe(3429)
    expect(() => lineTotals({ ...line, allocatedTaxMinor: 3427 })).toThrow(/rounded down or up/)
    expect(() => lineTotals({ ...line, allocatedTaxMinor: 3430 })).toThrow(/rounded down or up/)
  })

  it('a credit note mirrors an instalment’s distributed tax exactly', () => {
    const stored = { description: 'Instalment 5 of 7: Programme', unitMinor: 17143, quantity: 1, taxRateBasisPoints: 2000, taxMinor: 3428 }
    const credit = invoiceTotals(creditLines([stored]))
    expect([credit.netMinor, credit.taxMinor, credit.grossMinor]).toEqual([-17143, -3428, -20571])
  })
})

describe('nextReminderDue', () => {
  // Defaults of shared/schemas/settings-invoices.ts (common practice): first after 3 days, then every 7, at most 3.
  const policy = { enabled: true, firstAfterDaysOverdue: 3, intervalDays: 7, maxReminders: 3 }
  const never = (daysOverdue: number) => nextReminderDue({ daysOverdue, remindersSent: 0, daysSinceLastReminder: null }, policy)
  it('reminds an invoice never reminded, however long overdue, and none before the first day', () => {
    expect([0, 1, 2].map(never)).toEqual([null, null, null])
    // 2, 4, 11, 36 and 400 days overdue, never reminded: the first reminder is due for all but the 2-day one.
    expect([2, 4, 11, 36, 400].map(never)).toEqual([null, 1, 1, 1, 1])
  })
  it('sends the next one once its day has come and an interval has passed since the last, up to the maximum', () => {
    const at = (daysOverdue: number, remindersSent: number, daysSinceLastReminder: number | null) => nextReminderDue({ daysOverdue, remindersSent, daysSinceLastReminder }, policy)
    expect(at(9, 1, 6)).toBeNull() // the second's day (10) not yet come
    expect(at(10, 1, 7)).toBe(2)
    expect(at(36, 1, 0)).toBeNull() // reminded today: the next waits an interval
    expect(at(36, 1, 7)).toBe(2)
    expect(at(400, 2, 30)).toBe(3)
    expect(at(400, 3, 30)).toBeNull() // the maximum reached
    expect(nextReminderDue({ daysOverdue: 10, remindersSent: 0, daysSinceLastReminder: null }, { ...policy, enabled: false })).toBeNull()
  })
})

describe('revenueByMonth', () => {
  it('sums payments per month and currency over the last 12 months, oldest first', () => {
    expect(lastMonths('2026-03-20', 3)).toEqual(['2026-01', '2026-02', '2026-03'])
    const r = revenueByMonth([
      { receivedOn: '2026-03-01', currency: 'GBP', amountMinor: 1000 },
      { receivedOn: '2026-03-31', currency: 'GBP', amountMinor: 250 },
      { receivedOn: '2025-04-30', currency: 'GBP', amountMinor: 5 },
      { receivedOn: '2025-03-31', currency: 'GBP', amountMinor: 99 }, // 13 months back: outside
      { receivedOn: '2026-02-10', currency: 'EUR', amountMinor: 700 },
    ], '2026-03-20')
    expect(r.months).toHaveLength(12)
    expect(r.months[0]).toBe('2025-04')
    expect(r.byCurrency.GBP![0]).toBe(5)
    expect(r.byCurrency.GBP![11]).toBe(1250)
    expect(sum(r.byCurrency.GBP!)).toBe(1255)
    expect(r.byCurrency.EUR![10]).toBe(700)
  })
})

describe('parsePercent', () => {
  it('reads percents into basis points and refuses the rest', () => {
    expect(['20', '5.5', '0', '17.50', '100', '12.25 %'].map(parsePercent)).toEqual([2000, 550, 0, 1750, 10000, 1225])
    for (const bad of ['', '-5', '100.01', '5.555', 'twenty', '1e2']) expect(() => parsePercent(bad)).toThrow(RangeError)
  })
})

describe('fee schedule schemas', () => {
  it('turns the typed form into the route\'s shape, with field paths on mistakes', () => {
    const ok = feeScheduleFormSchema.safeParse({ currency: 'gbp', taxPercent: '20', deposit: '600', instalmentCount: '6', intervalMonths: '1', lines: [{ description: 'Programme', unit: '2,100.00', taxPercent: '' }] })
    expect(ok.success && ok.data).toEqual({ currency: 'GBP', taxRateBasisPoints: 2000, depositMinor: 60000, instalmentCount: 6, intervalMonths: 1, lines: [{ description: 'Programme', unitMinor: 210000, taxRateBasisPoints: null }] })
    expect(feeScheduleSchema.safeParse(ok.success && ok.data).success).toBe(true)
    const bad = feeScheduleFormSchema.safeParse({ currency: 'GBP', taxPercent: '20', deposit: '3000', instalmentCount: '6', intervalMonths: '1', lines: [{ description: 'Programme', unit: '12.345' }] })
    expect(bad.success).toBe(false)
    expect(bad.error!.issues.map(i => i.path.join('.'))).toContain('lines.0.unit')
    const tooMuch = feeScheduleSchema.safeParse({ currency: 'GBP', taxRateBasisPoints: 2000, depositMinor: 5, instalmentCount: 1, intervalMonths: 1, lines: [{ description: 'x', unitMinor: 4 }] })
    expect(tooMuch.success).toBe(false)
    expect(feeScheduleSchema.safeParse({ currency: 'ZZZ', taxRateBasisPoints: 0, depositMinor: 0, instalmentCount: 1, intervalMonths: 1, lines: [{ description: 'x', unitMinor: 4 }] }).success).toBe(false)
  })

  it('checks the invoice draft form with the invoice line rules', () => {
    const ok = invoiceDraftFormSchema('GBP').safeParse({ lines: [{ description: 'Extra session', unit: '45', quantity: '2', taxPercent: '20' }] })
    expect(ok.success && ok.data).toEqual({ notes: null, lines: [{ description: 'Extra session', unitMinor: 4500, quantity: 2, taxRateBasisPoints: 2000 }] })
    const bad = invoiceDraftFormSchema('JPY').safeParse({ lines: [{ description: '', unit: '10.5', quantity: '0', taxPercent: 'x' }] })
    expect(bad.success).toBe(false)
    expect(bad.error!.issues.map(i => i.path.join('.')).sort()).toEqual(['lines.0.description', 'lines.0.quantity', 'lines.0.taxPercent', 'lines.0.unit'])
  })
})
