// Invoices and credit notes, their lines, the per-year number sequence and payments recorded against them.
import { blob, index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { INVOICE_KINDS, INVOICE_STATUSES } from '../../../shared/utils/invoices'
import type { FeeLine } from '../../../shared/utils/fee-plan'
import type { FrozenInvoice } from '../../../shared/utils/invoice-document'
import { REFUND_METHOD_VALUES } from '../../../shared/schemas/invoices'
import { clients, id, timestamps, users } from './core'
import { programmeTemplates } from './training'

export const invoices = sqliteTable('invoices', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id),
  kind: text('kind', { enum: INVOICE_KINDS }).notNull().default('invoice'),
  status: text('status', { enum: INVOICE_STATUSES }).notNull().default('draft'),
  // Assigned when issued, from invoice_counters in the same transaction: no gaps, no duplicates.
  number: text('number'),
  numberYear: integer('number_year'),
  numberSeq: integer('number_seq'),
  currency: text('currency').notNull(),
  issueDate: text('issue_date'), // YYYY-MM-DD in the business's time zone
  dueDate: text('due_date'),
  netMinor: integer('net_minor').notNull(),
  taxMinor: integer('tax_minor').notNull(),
  grossMinor: integer('gross_minor').notNull(),
  paidMinor: integer('paid_minor').notNull().default(0),
  dueInDays: integer('due_in_days').notNull(),
  notes: text('notes'),
  // A credit note points at the invoice it credits.
  creditsInvoiceId: text('credits_invoice_id'),
  createdById: text('created_by_id').references(() => users.id),
  issuedAt: integer('issued_at', { mode: 'timestamp_ms' }),
  paidAt: integer('paid_at', { mode: 'timestamp_ms' }),
  voidedAt: integer('voided_at', { mode: 'timestamp_ms' }),
  // Created from a fee schedule's plan: which schedule and which part ('deposit', 'instalment:2'); unique per client,
  // so a plan's invoice is never created twice. A plan's draft is issued on `scheduledIssueOn` by the periodic job.
  feeScheduleId: text('fee_schedule_id'),
  planPart: text('plan_part'),
  scheduledIssueOn: text('scheduled_issue_on'),
  // Overdue reminders: how many were sent (one per policy interval) and when the last one was queued.
  remindersSent: integer('reminders_sent').notNull().default(0),
  lastRemindedAt: integer('last_reminded_at', { mode: 'timestamp_ms' }),
  // The one card checkout open for this invoice, whoever asked for it: reused while open, so it is paid once.
  checkoutSessionId: text('checkout_session_id'),
  // Written once, the first time anyone asks to pay by card: part of the idempotency key every payer shares.
  checkoutNonce: text('checkout_nonce'),
  // Money paid back (an overpayment, or the refund a credit note owes).
  refundedMinor: integer('refunded_minor').notNull().default(0),
  // The document as issued (seller, buyer, lines, rates, totals, wording), frozen at issue: its PDF is drawn from
  // this alone, so it is the same document however the business's settings change later.
  frozen: text('frozen', { mode: 'json' }).$type<FrozenInvoice>(),
  ...timestamps,
}, t => [
  uniqueIndex('invoices_number_uq').on(t.number),
  uniqueIndex('invoices_plan_part_uq').on(t.clientId, t.feeScheduleId, t.planPart),
  index('invoices_scheduled_idx').on(t.status, t.scheduledIssueOn),
  uniqueIndex('invoices_year_seq_uq').on(t.numberYear, t.numberSeq),
  index('invoices_client_idx').on(t.clientId, t.status),
])

export const invoiceLines = sqliteTable('invoice_lines', {
  id: id(),
  invoiceId: text('invoice_id').notNull().references(() => invoices.id, { onDelete: 'cascade' }),
  position: integer('position').notNull(),
  description: text('description').notNull(),
  unitMinor: integer('unit_minor').notNull(),
  quantity: integer('quantity').notNull(),
  taxRateBasisPoints: integer('tax_rate_bp').notNull(),
  netMinor: integer('net_minor').notNull(),
  taxMinor: integer('tax_minor').notNull(),
  grossMinor: integer('gross_minor').notNull(),
}, t => [index('invoice_lines_invoice_idx').on(t.invoiceId, t.position)])

/** The last number used per calendar year (one business per installation). */
export const invoiceCounters = sqliteTable('invoice_counters', {
  year: integer('year').primaryKey(),
  lastSeq: integer('last_seq').notNull(),
})

export const PAYMENT_METHODS = ['bank_transfer', 'cash', 'card'] as const

/** Money received against an invoice. A card payment carries its provider reference, unique, so it is never recorded twice. */
export const invoicePayments = sqliteTable('invoice_payments', {
  id: id(),
  invoiceId: text('invoice_id').notNull().references(() => invoices.id),
  amountMinor: integer('amount_minor').notNull(),
  method: text('method', { enum: PAYMENT_METHODS }).notNull(),
  reference: text('reference'),
  receivedOn: text('received_on').notNull(), // YYYY-MM-DD
  recordedById: text('recorded_by_id').references(() => users.id),
  // What the household sees: R-<invoice number>-<n>, never the provider's internal id.
  receiptNumber: text('receipt_number'),
  ...timestamps,
}, t => [uniqueIndex('invoice_payments_reference_uq').on(t.method, t.reference), index('invoice_payments_invoice_idx').on(t.invoiceId)])

/** Every Stripe event processed, by its id: a replayed or duplicated event is recognised and changes nothing. */
export const stripeEvents = sqliteTable('stripe_events', {
  id: text('id').primaryKey(),
  type: text('type').notNull(),
  invoiceId: text('invoice_id'),
  outcome: text('outcome').notNull(),
  receivedAt: integer('received_at', { mode: 'timestamp_ms' }).notNull().$defaultFn(() => new Date()),
})

export const PAYMENT_PROBLEM_KINDS = ['currency-mismatch', 'amount-mismatch', 'unknown-invoice'] as const

/**
 * A card payment the webhook did not record because it does not match its invoice (another currency, another amount,
 * no such invoice): listed for the office to look into, never counted as paid.
 */
export const paymentProblems = sqliteTable('payment_problems', {
  id: id(),
  eventId: text('event_id').notNull(),
  invoiceId: text('invoice_id'),
  kind: text('kind', { enum: PAYMENT_PROBLEM_KINDS }).notNull(),
  amountMinor: integer('amount_minor'),
  currency: text('currency'),
  reference: text('reference'),
  detail: text('detail').notNull(),
  resolvedAt: integer('resolved_at', { mode: 'timestamp_ms' }),
  resolvedById: text('resolved_by_id').references(() => users.id),
  resolution: text('resolution'),
  ...timestamps,
}, t => [uniqueIndex('payment_problems_event_uq').on(t.eventId)])

/** Money paid back to a household: against an overpaid invoice, or the credit note that owes it. */
export const invoiceRefunds = sqliteTable('invoice_refunds', {
  id: id(),
  invoiceId: text('invoice_id').notNull().references(() => invoices.id),
  amountMinor: integer('amount_minor').notNull(),
  method: text('method', { enum: REFUND_METHOD_VALUES }).notNull(),
  reference: text('reference'),
  paidOn: text('paid_on').notNull(), // YYYY-MM-DD
  recordedById: text('recorded_by_id').references(() => users.id),
  ...timestamps,
}, t => [index('invoice_refunds_invoice_idx').on(t.invoiceId)])

/** Logos uploaded by the office, kept by content hash and never changed, so an issued invoice keeps its logo. */
export const businessLogos = sqliteTable('business_logos', {
  id: text('id').primaryKey(), // sha-256 of the bytes
  mime: text('mime').notNull(),
  bytes: blob('bytes', { mode: 'buffer' }).notNull(),
  ...timestamps,
})

/** A programme template's fees: the price list and the payment plan (deposit, then instalments), one per template. */
export const feeSchedules = sqliteTable('fee_schedules', {
  id: id(),
  templateId: text('template_id').notNull().references(() => programmeTemplates.id, { onDelete: 'cascade' }),
  currency: text('currency').notNull(),
  taxRateBasisPoints: integer('tax_rate_bp').notNull(),
  depositMinor: integer('deposit_minor').notNull(),
  instalmentCount: integer('instalment_count').notNull(),
  intervalMonths: integer('interval_months').notNull().default(1),
  lines: text('lines', { mode: 'json' }).$type<FeeLine[]>().notNull(),
  updatedById: text('updated_by_id').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [uniqueIndex('fee_schedules_template_uq').on(t.templateId)])
