// Invoices: states, numbering and credit notes as pure rules (no database). Money itself lives in ./money.
import { invoiceTotals, type LineInput } from './money'

export const INVOICE_STATUSES = ['draft', 'open', 'paid', 'void'] as const
export type InvoiceStatus = typeof INVOICE_STATUSES[number]
export const INVOICE_KINDS = ['invoice', 'credit_note'] as const
export type InvoiceKind = typeof INVOICE_KINDS[number]
/** What people see: the stored status, with "overdue" derived for an open invoice past its due date. */
export type InvoiceShownState = InvoiceStatus | 'overdue'

export const INVOICE_STATE_LABELS: Record<InvoiceShownState, string> = {
  draft: 'Draft', open: 'Open', overdue: 'Overdue', paid: 'Paid', void: 'Void',
}

/** Open and past its due date (a calendar date, YYYY-MM-DD, compared with today's date in the business's zone). */
export function shownState(status: InvoiceStatus, dueDate: string | null, today: string): InvoiceShownState {
  if (status === 'open' && dueDate && dueDate < today) return 'overdue'
  return status
}

/** Numbers run without gaps per year: INV-2026-0001; credit notes share the sequence and read CN-2026-0002. */
export function formatInvoiceNumber(kind: InvoiceKind, year: number, seq: number): string {
  if (!Number.isSafeInteger(year) || year < 1000 || year > 9999) throw new RangeError('The invoice year must have four digits.')
  if (!Number.isSafeInteger(seq) || seq < 1) throw new RangeError('The invoice sequence starts at 1.')
  return `${kind === 'credit_note' ? 'CN' : 'INV'}-${year}-${String(seq).padStart(4, '0')}`
}

/** Which changes each state allows. An issued invoice is never edited: a credit note corrects it. */
export function canIssue(status: InvoiceStatus) { return status === 'draft' }
// Only a draft is voided (discarded); it never had a number, so the sequence keeps no gap.
export function canVoid(status: InvoiceStatus) { return status === 'draft' }
export function canCredit(kind: InvoiceKind, status: InvoiceStatus) { return kind === 'invoice' && (status === 'open' || status === 'paid') }

export interface StoredLine extends LineInput { description: string }

/**
 * A credit note's lines: each line of the invoice with its unit price negated, so its tax mirrors exactly. A stored
 * line's own tax (`taxMinor`, e.g. a plan instalment's distributed tax) is negated with it.
 */
export function creditLines(lines: ReadonlyArray<StoredLine & { taxMinor?: number }>): StoredLine[] {
  return lines.map(l => ({
    description: `Credit: ${l.description}`, unitMinor: -l.unitMinor, quantity: l.quantity, taxRateBasisPoints: l.taxRateBasisPoints,
    ...(l.taxMinor !== undefined ? { allocatedTaxMinor: -l.taxMinor } : {}),
  }))
}

/** What is still owed on an invoice (never below zero). */
export function balanceDue(grossMinor: number, paidMinor: number): number {
  return Math.max(0, grossMinor - paidMinor)
}

/** A due date `days` after an issue date, both YYYY-MM-DD (calendar arithmetic in UTC, no time zone drift). */
export function addDays(isoDate: string, days: number): string {
  const d = new Date(`${isoDate}T00:00:00Z`)
  d.setUTCDate(d.getUTCDate() + days)
  return d.toISOString().slice(0, 10)
}

/** Totals for a set of lines, refusing an invoice whose total is negative (that is what a credit note is for). */
export function invoiceTotalsForIssue(lines: readonly StoredLine[], kind: InvoiceKind) {
  const totals = invoiceTotals(lines)
  if (kind === 'invoice' && totals.grossMinor < 0) throw new RangeError('An invoice cannot total less than zero. Issue a credit note instead.')
  return totals
}

export const AGE_BUCKETS = ['current', '1-30', '31-60', '61-90', '90+'] as const
export type AgeBucket = typeof AGE_BUCKETS[number]

/** Whole days an invoice is past its due date on `today` (0 when not yet due). Both YYYY-MM-DD. */
export function daysOverdue(dueDate: string, today: string): number {
  const ms = Date.parse(`${today}T00:00:00Z`) - Date.parse(`${dueDate}T00:00:00Z`)
  return Math.max(0, Math.round(ms / 86_400_000))
}

/** Aged receivables: what is owed on open invoices by how long it is overdue, per currency. */
export function agedReceivables(rows: ReadonlyArray<{ status: InvoiceStatus, kind: InvoiceKind, dueDate: string | null, currency: string, balanceMinor: number }>, today: string) {
  const out: Record<string, Record<AgeBucket, number>> = {}
  for (const r of rows) {
    if (r.kind !== 'invoice' || r.status !== 'open' || r.balanceMinor <= 0 || !r.dueDate) continue
    const d = daysOverdue(r.dueDate, today)
    const bucket: AgeBucket = d === 0 ? 'current' : d <= 30 ? '1-30' : d <= 60 ? '31-60' : d <= 90 ? '61-90' : '90+'
    const c = (out[r.currency] ??= { 'current': 0, '1-30': 0, '31-60': 0, '61-90': 0, '90+': 0 })
    c[bucket] += r.balanceMinor
  }
  return out
}

/**
 * Money owed back to the household on a document: on an invoice, what was paid beyond its total (all of it when the
 * invoice was voided); on an open credit note (a paid invoice credited), its amount. Less what was already refunded.
 */
export function refundDue(inv: { kind: InvoiceKind, status: InvoiceStatus, grossMinor: number, paidMinor: number, refundedMinor: number }): number {
  if (inv.kind === 'credit_note') return inv.status === 'open' ? Math.max(0, -inv.grossMinor - inv.refundedMinor) : 0
  if (inv.status === 'void') return Math.max(0, inv.paidMinor - inv.refundedMinor)
  return Math.max(0, inv.paidMinor - inv.grossMinor - inv.refundedMinor)
}
