// Fee plans (pure, no database): a programme template's price list and payment plan turned into dated invoices,
// overdue reminders once per policy interval, and payments received per month. Money is integer minor units.
import { BASIS_POINTS_PER_WHOLE, invoiceTotals, lineTotals, splitInstalments, type InvoiceTotals } from './money'

export interface FeeLine {
  description: string
  /** Net price in minor units (the whole programme's share of this line). */
  unitMinor: number
  /** Basis points; null means the schedule's own tax rate. */
  taxRateBasisPoints: number | null
}

export interface FeeScheduleInput {
  lines: readonly FeeLine[]
  /** Tax rate in basis points for lines without their own. */
  taxRateBasisPoints: number
  /** Net deposit in minor units, at most the total of the lines; 0 for none. */
  depositMinor: number
  /** Instalments after the deposit, splitting the rest (at least 1). */
  instalmentCount: number
  /** Months between instalments (1 = monthly). */
  intervalMonths: number
}

export interface PlanInvoiceLine {
  description: string
  unitMinor: number
  quantity: 1
  taxRateBasisPoints: number
  /** This part's share of its price list line's tax (allocateTax): the plan adds up exactly to the quote. */
  allocatedTaxMinor: number
}
export interface PlanInvoice {
  /** 'deposit' or 'instalment:k' (k from 1): stable within one plan, used to create each invoice once only. */
  part: string
  label: string
  /** The day the invoice is issued (YYYY-MM-DD): the deposit on the start date, instalment k k intervals later. */
  issueOn: string
  netMinor: number
  lines: PlanInvoiceLine[]
}

/** A calendar date `months` later, clamped to the month's last day: 2026-01-31 + 1 month = 2026-02-28. */
export function addMonths(isoDate: string, months: number): string {
  const [y, m, d] = isoDate.split('-').map(Number) as [number, number, number]
  const total = (y * 12 + (m - 1)) + months
  const year = Math.floor(total / 12)
  const month = total - year * 12 // 0-based
  const last = new Date(Date.UTC(year, month + 1, 0)).getUTCDate()
  return `${String(year).padStart(4, '0')}-${String(month + 1).padStart(2, '0')}-${String(Math.min(d, last)).padStart(2, '0')}`
}

/** The programme's net total: the sum of the price list. */
export function feeScheduleTotal(lines: readonly FeeLine[]): number {
  return lines.reduce((a, l) => a + l.unitMinor, 0)
}

/**
 * The quote: the price list as one invoice, tax worked per price list line (rounded halves away from zero). The
 * plan's invoices add up to exactly this net, tax and gross.
 */
export function feeScheduleQuote(schedule: Pick<FeeScheduleInput, 'lines' | 'taxRateBasisPoints'>): InvoiceTotals {
  return invoiceTotals(schedule.lines.map(l => ({ unitMinor: l.unitMinor, quantity: 1, taxRateBasisPoints: l.taxRateBasisPoints ?? schedule.taxRateBasisPoints })))
}

/**
 * Distributes the tax on a whole price list line over its parts (deposit share, instalment shares) by the largest
 * remainder method (Hamilton's method): each part first gets its exact tax (net × rate) rounded down; the minor
 * units still missing to reach the line's quoted tax go one each to the parts with the largest fractions, the
 * earlier part first on a tie. So every part's tax is its exact tax rounded down or up — never further — and the
 * parts add up exactly to the quoted tax. Nets must be whole minor units, 0 or more.
 */
export function allocateTax(partsNet: readonly number[], taxRateBasisPoints: number): number[] {
  if (partsNet.some(n => !Number.isSafeInteger(n) || n < 0)) throw new RangeError('Every part must be a whole number of minor units, 0 or more.')
  const total = partsNet.reduce((a, n) => a + n, 0)
  const quoted = lineTotals({ unitMinor: total, quantity: 1, taxRateBasisPoints }).taxMinor
  const whole = BigInt(BASIS_POINTS_PER_WHOLE)
  const exact = partsNet.map(n => BigInt(n) * BigInt(taxRateBasisPoints))
  const shares = exact.map(e => Number(e / whole)) // nets are ≥ 0, so division truncates = rounds down
  const fractions = exact.map(e => Number(e % whole))
  let missing = quoted - shares.reduce((a, n) => a + n, 0)
  const order = partsNet.map((_, i) => i).filter(i => fractions[i]! > 0).sort((a, b) => fractions[b]! - fractions[a]! || a - b)
  if (missing < 0 || missing > order.length) throw new RangeError('The tax cannot be distributed over these parts.') // cannot happen for nets ≥ 0
  for (const i of order) {
    if (missing === 0) break
    shares[i]! += 1
    missing -= 1
  }
  return shares
}

/**
 * The plan's invoices, deposit first. The deposit is taken from the price list lines in their order (usually all from
 * the first line); what is left of each line is split over the instalments with splitInstalments, so every line's
 * shares add up to the line exactly and the plan adds up to the price list exactly (net). Each invoice line carries
 * its price list line's tax rate and its share of that line's quoted tax (allocateTax), so the plan's invoices add
 * up exactly to the quote's gross (feeScheduleQuote) — rounding tax per instalment could overshoot by a few minor
 * units (£1,200.00 + 20 % in 7 instalments: £240.02 instead of £240.00).
 */
export function buildFeePlan(schedule: FeeScheduleInput, startDate: string): PlanInvoice[] {
  const total = feeScheduleTotal(schedule.lines)
  if (!schedule.lines.length) throw new RangeError('Add at least one line to the price list.')
  if (schedule.lines.some(l => !Number.isSafeInteger(l.unitMinor) || l.unitMinor < 0)) throw new RangeError('Every price must be a whole number of minor units, 0 or more.')
  if (!Number.isSafeInteger(schedule.depositMinor) || schedule.depositMinor < 0) throw new RangeError('The deposit must be a whole number of minor units, 0 or more.')
  if (schedule.depositMinor > total) throw new RangeError('The deposit cannot be more than the price list total.')
  if (!Number.isSafeInteger(schedule.intervalMonths) || schedule.intervalMonths < 1) throw new RangeError('Instalments are at least one month apart.')
  const rate = (l: FeeLine) => l.taxRateBasisPoints ?? schedule.taxRateBasisPoints
  const out: PlanInvoice[] = []
  let depositLeft = schedule.depositMinor
  const depositTaken = schedule.lines.map((l) => {
    const take = Math.min(depositLeft, l.unitMinor)
    depositLeft -= take
    return take
  })
  const n = schedule.instalmentCount
  const shares = schedule.lines.map((l, i) => splitInstalments(l.unitMinor - depositTaken[i]!, n))
  // Each price list line's tax over its parts: [deposit share, instalment 1, …, instalment n].
  const taxes = schedule.lines.map((l, i) => allocateTax([depositTaken[i]!, ...shares[i]!], rate(l)))
  if (schedule.depositMinor > 0) {
    out.push({
      part: 'deposit', label: 'Deposit', issueOn: startDate, netMinor: schedule.depositMinor,
      lines: schedule.lines.flatMap((l, i) => depositTaken[i]! > 0 ? [{ description: `Deposit: ${l.description}`, unitMinor: depositTaken[i]!, quantity: 1 as const, taxRateBasisPoints: rate(l), allocatedTaxMinor: taxes[i]![0]! }] : []),
    })
  }
  for (let k = 1; k <= n; k++) {
    const lines = schedule.lines.flatMap((l, i) => {
      const amount = shares[i]![k - 1]!
      return amount > 0 ? [{ description: `Instalment ${k} of ${n}: ${l.description}`, unitMinor: amount, quantity: 1 as const, taxRateBasisPoints: rate(l), allocatedTaxMinor: taxes[i]![k]! }] : []
    })
    if (!lines.length) continue // nothing left to pay (e.g. the deposit covers everything)
    out.push({ part: `instalment:${k}`, label: `Instalment ${k} of ${n}`, issueOn: addMonths(startDate, k * schedule.intervalMonths), netMinor: lines.reduce((a, l) => a + l.unitMinor, 0), lines })
  }
  return out
}

export interface ReminderPolicy {
  enabled: boolean
  /** Days past the due date before the first reminder. */
  firstAfterDaysOverdue: number
  /** Days between reminders. */
  intervalDays: number
  /** At most this many reminders per invoice. */
  maxReminders: number
}

/**
 * The number of the reminder to send now, or null. Reminder k has its day `first + (k − 1) × interval` days after the
 * due date; the next one not yet sent (`sent + 1`) goes once its day has come and at least an interval has passed
 * since the last one, up to the maximum. So an invoice found long overdue (a run missed, reminders turned on late, an
 * old debt) still gets its reminders, one per interval, instead of none because its scheduled days are past.
 */
export function nextReminderDue(
  state: { daysOverdue: number, remindersSent: number, daysSinceLastReminder: number | null },
  policy: ReminderPolicy,
): number | null {
  if (!policy.enabled || state.remindersSent >= policy.maxReminders) return null
  const k = state.remindersSent + 1
  if (state.daysOverdue < 1 || state.daysOverdue < policy.firstAfterDaysOverdue + (k - 1) * policy.intervalDays) return null
  if (state.daysSinceLastReminder !== null && state.daysSinceLastReminder < policy.intervalDays) return null
  return k
}

/** The `count` calendar months ending with today's, oldest first, as YYYY-MM. */
export function lastMonths(today: string, count = 12): string[] {
  const first = addMonths(`${today.slice(0, 7)}-01`, -(count - 1))
  return Array.from({ length: count }, (_, i) => addMonths(first, i).slice(0, 7))
}

/** Payments received per month (by their received-on date) and currency, over the last `count` months. */
export function revenueByMonth(payments: ReadonlyArray<{ receivedOn: string, currency: string, amountMinor: number }>, today: string, count = 12) {
  const months = lastMonths(today, count)
  const index = new Map(months.map((m, i) => [m, i]))
  const byCurrency: Record<string, number[]> = {}
  for (const p of payments) {
    const i = index.get(p.receivedOn.slice(0, 7))
    if (i === undefined) continue
    const row = (byCurrency[p.currency] ??= months.map(() => 0))
    row[i]! += p.amountMinor
  }
  return { months, byCurrency }
}
