// The invoicing policy: what every invoice carries besides the business profile (name, locale, currency).
import { z } from 'zod'
import { numeric } from './common'
import { defineSetting } from './settings'

export const invoicePolicySchema = z.object({
  // The tax rate a new invoice line starts with, in per cent (20 for 20 %).
  defaultTaxRatePercent: numeric(z.number().min(0, 'The tax rate cannot be negative.').max(100, 'The tax rate is at most 100 %.').multipleOf(0.01, 'Use at most two decimals, like 5.5.')),
  paymentTermsDays: numeric(z.number().int('Use whole days.').min(0, 'Use 0 or more days.').max(365, 'Use at most 365 days.')),
  footer: z.string().trim().max(300, 'Use at most 300 characters.').default(''),
})
export type InvoicePolicy = z.infer<typeof invoicePolicySchema>

export const INVOICE_POLICY_KEY = 'invoices'
export const INVOICE_POLICY_DEFAULTS: InvoicePolicy = {
  defaultTaxRatePercent: 20, // the UK standard rate of VAT (GOV.UK, "VAT rates", from memory); the business sets its own
  paymentTermsDays: 14, // 14 days to pay (common practice for small service businesses).
  footer: 'Thank you. Payment by card online, or by bank transfer quoting the invoice number.',
}

export const invoicePolicy = defineSetting(INVOICE_POLICY_KEY, {
  label: 'Invoices',
  description: 'The tax rate new invoice lines start with, how many days a household has to pay, and the footer line. The VAT number and bank details are under Business identity.',
  schema: invoicePolicySchema,
  defaults: INVOICE_POLICY_DEFAULTS,
  fieldLabels: { defaultTaxRatePercent: 'Tax rate of a new line (%)', paymentTermsDays: 'Days to pay', footer: 'Footer line' },
})

// Overdue reminders: one e-mail per open invoice per interval once it is overdue, at most a few times.
export const reminderPolicySchema = z.object({
  enabled: z.boolean({ invalid_type_error: "Choose yes or no." }),
  firstAfterDaysOverdue: numeric(z.number().int('Use whole days.').min(1, 'Use at least 1 day.').max(365, 'Use at most 365 days.')),
  intervalDays: numeric(z.number().int('Use whole days.').min(1, 'Use at least 1 day.').max(365, 'Use at most 365 days.')),
  maxReminders: numeric(z.number().int('Use a whole number.').min(1, 'Use at least 1.').max(20, 'Use at most 20.')),
})
export type ReminderPolicySetting = z.infer<typeof reminderPolicySchema>

export const REMINDER_POLICY_KEY = 'invoice-reminders'
export const REMINDER_POLICY_DEFAULTS: ReminderPolicySetting = {
  enabled: true,
  firstAfterDaysOverdue: 3, // a first polite reminder a few days after the due date (common practice)
  intervalDays: 7, // then weekly (common practice)
  maxReminders: 3, // then the office follows up in person (common practice)
}

export const reminderPolicy = defineSetting(REMINDER_POLICY_KEY, {
  label: 'Overdue reminders',
  description: 'When the household is reminded of an overdue invoice by e-mail: first after so many days past the due date, then once per interval, at most so many times.',
  schema: reminderPolicySchema,
  defaults: REMINDER_POLICY_DEFAULTS,
  fieldLabels: { enabled: 'Send reminders', firstAfterDaysOverdue: 'First reminder after (days overdue)', intervalDays: 'Days between reminders', maxReminders: 'Most reminders per invoice' },
})
