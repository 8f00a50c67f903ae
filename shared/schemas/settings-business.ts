import { z } from 'zod'
import { defineSetting } from './settings'

export const businessProfileSchema = z.object({
  name: z.string().trim().min(1, 'Enter the business name.').max(120, 'Use at most 120 characters.'),
  timeZone: z.string().trim().min(1).max(64).refine((tz) => {
    try { new Intl.DateTimeFormat('en-GB', { timeZone: tz }); return true }
    catch { return false }
  }, 'Use a time-zone name like Europe/London (IANA time-zone database).'),
  locale: z.string().trim().min(2).max(20).default('en-GB'),
  currency: z.string().trim().length(3, 'Use a three-letter ISO 4217 code, like GBP.').toUpperCase().default('GBP'),
})
export type BusinessProfile = z.infer<typeof businessProfileSchema>

export const businessProfile = defineSetting('business', {
  label: 'Business',
  description: 'The name, time zone, locale and currency used on pages, e-mails and invoices.',
  schema: businessProfileSchema,
  // Our own defaults for a UK business; the demo seed names its invented business.
  defaults: { name: 'Forescent', timeZone: 'Europe/London', locale: 'en-GB', currency: 'GBP' },
})
