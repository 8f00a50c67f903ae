import { z } from 'zod'
import { isoDate, optionalText } from './common'
import { INVOICE_STATUSES } from '../utils/invoices'

// Amounts arrive as integer minor units (pence for GBP): a float or a fraction of a minor unit is refused.
const wholeMinor = (what: string) => z.number({ required_error: `Enter the ${what}.`, invalid_type_error: `The ${what} must be a number of minor units (e.g. pence).` })
  .int(`The ${what} must be a whole number of minor units (e.g. 1250 for £12.50).`)

export const invoiceLineSchema = z.object({
  description: z.string({ required_error: 'Describe the line.' }).trim().min(1, 'Describe the line.').max(200, 'Use at most 200 characters.'),
  unitMinor: wholeMinor('unit price').min(0, 'The unit price cannot be negative. Issue a credit note to give money back.').max(100_000_000_00, 'The unit price is too large.'),
  quantity: z.number({ invalid_type_error: 'The quantity must be a number.' }).int('Use a whole quantity.').min(1, 'Use a quantity of at least 1.').max(1000, 'Use a quantity of at most 1000.'),
  // Basis points: 2000 = 20 %. Optional per line; 0 when the line carries no tax.
  taxRateBasisPoints: z.number({ invalid_type_error: 'The tax rate must be a number.' }).int('Use whole basis points (2000 = 20 %).').min(0, 'The tax rate cannot be negative.').max(10_000, 'The tax rate is at most 100 %.').default(0),
})
export type InvoiceLineInput = z.infer<typeof invoiceLineSchema>

export const invoiceCreateSchema = z.object({
  currency: z.string().trim().length(3, 'Use a three-letter ISO 4217 code, like GBP.').toUpperCase().optional(),
  dueInDays: z.number({ invalid_type_error: 'Enter a number of days.' }).int('Use whole days.').min(0, 'Use 0 or more days.').max(365, 'Use at most 365 days.').optional(),
  notes: optionalText(1000),
  lines: z.array(invoiceLineSchema).min(1, 'Add at least one line.').max(50, 'Use at most 50 lines.'),
})
export type InvoiceCreateInput = z.infer<typeof invoiceCreateSchema>

export const invoiceListQuery = z.object({
  status: z.enum([...INVOICE_STATUSES, 'overdue', 'scheduled']).optional(),
  clientId: z.string().trim().min(1).max(64).optional(),
})

export const creditNoteSchema = z.object({
  reason: z.string({ required_error: 'Give the reason for the credit note.' }).trim().min(1, 'Give the reason for the credit note.').max(500, 'Use at most 500 characters.'),
})

export const issueDateSchema = isoDate

export const MANUAL_PAYMENT_METHODS = ['bank_transfer', 'cash'] as const
export const manualPaymentSchema = z.object({
  amountMinor: wholeMinor('amount').min(1, 'The amount must be more than zero.'),
  method: z.enum(MANUAL_PAYMENT_METHODS, { errorMap: () => ({ message: 'Choose bank transfer or cash.' }) }),
  reference: optionalText(80),
  receivedOn: isoDate,
})
export type ManualPaymentInput = z.infer<typeof manualPaymentSchema>

export const REFUND_METHOD_VALUES = ['bank_transfer', 'card', 'cash'] as const
export const refundSchema = z.object({
  amountMinor: wholeMinor('amount').min(1, 'The amount must be more than zero.'),
  method: z.enum(REFUND_METHOD_VALUES, { errorMap: () => ({ message: 'Choose bank transfer, card or cash.' }) }),
  reference: optionalText(80),
  paidOn: isoDate,
})
export type RefundInput = z.infer<typeof refundSchema>

export const paymentProblemResolveSchema = z.object({
  resolution: z.string({ required_error: 'Say what was done about it.' }).trim().min(1, 'Say what was done about it.').max(500, 'Use at most 500 characters.'),
})

/** The accountant's export: documents issued, payments received and refunds paid between two days (inclusive). */
export const invoiceExportQuery = z.object({ from: isoDate, to: isoDate }).superRefine((q, ctx) => {
  if (q.from > q.to) ctx.addIssue({ code: 'custom', path: ['to'], message: 'The end date is before the start date.' })
  else if (Date.parse(q.to) - Date.parse(q.from) > 3 * 366 * 86_400_000) ctx.addIssue({ code: 'custom', path: ['to'], message: 'Export at most three years at a time.' })
})
