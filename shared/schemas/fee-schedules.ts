// Fee schedules per programme template, and the invoices created from one, as the routes accept them (minor units)
// and as the admin's forms type them (amounts in the currency, tax as a percent), one set of rules for both.
import { z } from 'zod'
import { isoDate, numeric } from './common'
import { invoiceLineSchema } from './invoices'
import { minorUnits, parseMoney, parsePercent } from '../utils/money'
import { feeScheduleTotal } from '../utils/fee-plan'

const taxBp = invoiceLineSchema.shape.taxRateBasisPoints.removeDefault()
const currencyCode = z.string({ required_error: 'Enter the currency.' }).trim().length(3, 'Use a three-letter ISO 4217 code, like GBP.').toUpperCase()
  .refine((c) => { try { minorUnits(c); return true } catch { return false } }, 'Use a currency Forescent can bill in: an ISO 4217 code such as GBP or EUR.')

export const feeLineSchema = z.object({
  description: invoiceLineSchema.shape.description,
  unitMinor: invoiceLineSchema.shape.unitMinor,
  // null: the schedule's tax rate.
  taxRateBasisPoints: taxBp.nullable().default(null),
})

const planShape = {
  currency: currencyCode,
  taxRateBasisPoints: taxBp,
  depositMinor: z.number({ invalid_type_error: 'The deposit must be a number of minor units.' }).int('The deposit must be a whole number of minor units.').min(0, 'The deposit cannot be negative.'),
  instalmentCount: z.number({ invalid_type_error: 'Enter the number of instalments.' }).int('Use a whole number of instalments.').min(1, 'Use at least 1 instalment.').max(60, 'Use at most 60 instalments.'),
  intervalMonths: z.number({ invalid_type_error: 'Enter the months between instalments.' }).int('Use whole months.').min(1, 'Instalments are at least 1 month apart.').max(12, 'Instalments are at most 12 months apart.'),
}

export const feeScheduleSchema = z.object({
  ...planShape,
  lines: z.array(feeLineSchema).min(1, 'Add at least one line to the price list.').max(30, 'Use at most 30 lines.'),
}).superRefine((v, ctx) => {
  if (v.depositMinor > feeScheduleTotal(v.lines)) ctx.addIssue({ code: 'custom', path: ['depositMinor'], message: 'The deposit cannot be more than the price list total.' })
})
export type FeeScheduleInput = z.infer<typeof feeScheduleSchema>

/** "Create invoices from the plan" for a client who already has a programme. */
export const planInvoicesSchema = z.object({
  templateId: z.string({ required_error: 'Choose a fee schedule.' }).trim().min(1, 'Choose a fee schedule.').max(64),
  startDate: isoDate,
})

// ---------------------------------------------------------------------------------------------------------------
// The admin's form: what a person types, checked and turned into the route's shape (vee-validate's toTypedSchema
// gives handleSubmit the transformed values).

function check(parse: () => unknown, ctx: z.RefinementCtx, path: (string | number)[]) {
  try { parse() }
  catch (e) { ctx.addIssue({ code: 'custom', path, message: (e as Error).message }) }
}
const wholeText = (what: string, min: number, max: number) => numeric(z.number({ invalid_type_error: `Enter the ${what}.` })
  .int(`Use a whole number for the ${what}.`).min(min, `Use at least ${min}.`).max(max, `Use at most ${max}.`))

// Checks run in superRefine (zod runs it even when another field is wrong, so every mistake shows at once);
// the conversion runs in transform, once everything is valid.
export const feeScheduleFormSchema = z.object({
  currency: z.string().trim().length(3, 'Use a three-letter ISO 4217 code, like GBP.'),
  taxPercent: z.string().trim().min(1, 'Enter the tax rate, 0 when none.'),
  deposit: z.string().trim().default('0'),
  instalmentCount: wholeText('number of instalments', 1, 60),
  intervalMonths: wholeText('months between instalments', 1, 12),
  lines: z.array(z.object({
    description: invoiceLineSchema.shape.description,
    unit: z.string().trim().min(1, 'Enter the price.'),
    taxPercent: z.string().trim().optional(),
  })).min(1, 'Add at least one line to the price list.').max(30, 'Use at most 30 lines.'),
}).superRefine((v, ctx) => {
  const currency = String(v.currency ?? '').toUpperCase()
  let known = true
  try { minorUnits(currency) }
  catch (e) { known = false; ctx.addIssue({ code: 'custom', path: ['currency'], message: (e as Error).message }) }
  check(() => parsePercent(v.taxPercent ?? ''), ctx, ['taxPercent'])
  if (!known) return
  check(() => parseMoney(v.deposit || '0', currency), ctx, ['deposit'])
  let total = 0
  ;(v.lines ?? []).forEach((l, i) => {
    check(() => { total += parseMoney(l.unit ?? '', currency) }, ctx, ['lines', i, 'unit'])
    if (l.taxPercent) check(() => parsePercent(l.taxPercent!), ctx, ['lines', i, 'taxPercent'])
  })
  try { if (parseMoney(v.deposit || '0', currency) > total) ctx.addIssue({ code: 'custom', path: ['deposit'], message: 'The deposit cannot be more than the price list total.' }) }
  catch { /* reported above */ }
}).transform((v) => {
  const currency = v.currency.toUpperCase()
  return {
    currency,
    taxRateBasisPoints: parsePercent(v.taxPercent),
    depositMinor: parseMoney(v.deposit || '0', currency),
    instalmentCount: v.instalmentCount,
    intervalMonths: v.intervalMonths,
    lines: v.lines.map(l => ({ description: l.description, unitMinor: parseMoney(l.unit, currency), taxRateBasisPoints: l.taxPercent ? parsePercent(l.taxPercent) : null })),
  }
})

/** The invoice draft form: prices typed in the currency, tax as a percent, checked by the route's own line rules. */
export function invoiceDraftFormSchema(currency: string) {
  const moneyText = z.string().trim().min(1, 'Enter the unit price.').superRefine((t, ctx) => check(() => parseMoney(t, currency), ctx, []))
  const percentText = z.string().trim().default('0').superRefine((t, ctx) => check(() => parsePercent(t || '0'), ctx, []))
  return z.object({
    notes: z.string().trim().max(1000, 'Use at most 1000 characters.').optional(),
    lines: z.array(z.object({
      description: invoiceLineSchema.shape.description,
      unit: moneyText,
      quantity: numeric(z.number({ invalid_type_error: 'The quantity must be a number.' }).pipe(invoiceLineSchema.shape.quantity)),
      taxPercent: percentText,
    })).min(1, 'Add at least one line.').max(50, 'Use at most 50 lines.'),
  }).transform(v => ({
    notes: v.notes ? v.notes : null,
    lines: v.lines.map(l => ({ description: l.description, unitMinor: parseMoney(l.unit, currency), quantity: l.quantity, taxRateBasisPoints: parsePercent(l.taxPercent || '0') })),
  }))
}
