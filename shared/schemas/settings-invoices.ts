// The invoicing policy: what every invoice carries besides the business profile (name, locale, currency).
import { z } from 'zod'
import { defineSetting } from './settings'

export const invoicePolicySchema = z.object({
  taxNumber: z.string().trim().max(40, 'Use at most 40 characters.').default(''),
  paymentTermsDays: z.coerce.number().int('Use whole days.').min(0, 'Use 0 or more days.').max(365, 'Use at most 365 days.'),
  footer: z.string().trim().max(300, 'Use at most 300 characters.').default(''),
})
export type InvoicePolicy = z.infer<typeof invoicePolicySchema>

export const INVOICE_POLICY_KEY = 'invoices'
export const INVOICE_POLICY_DEFAULTS: InvoicePolicy = {
  taxNumber: '', // The business's VAT or sales-tax number, printed on invoices when set.
  paymentTermsDays: 14, // 14 days to pay (common practice for small service businesses).
  footer: 'Thank you. Payment by card online, or by bank transfer quoting the invoice number.',
}

export const invoicePolicy = defineSetting(INVOICE_POLICY_KEY, {
  label: 'Invoices',
  description: 'The tax number printed on invoices, how many days a household has to pay, and the footer line.',
  schema: invoicePolicySchema,
  defaults: INVOICE_POLICY_DEFAULTS,
  fieldLabels: { taxNumber: 'Tax number (VAT / sales tax)', paymentTermsDays: 'Days to pay', footer: 'Footer line' },
})
