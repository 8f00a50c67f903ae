import { z } from 'zod'

export const email = z.string({ required_error: 'Enter an e-mail address.' })
  .trim().toLowerCase()
  .min(3, 'Enter an e-mail address.')
  .max(254, 'An e-mail address is at most 254 characters (RFC 5321).')
  .email('Enter a valid e-mail address, like name@example.com.')

// NIST SP 800-63B asks for at least 8 characters and allows long passphrases; we ask for 10 (common practice).
export const newPassword = z.string({ required_error: 'Choose a password.' })
  .min(10, 'Use at least 10 characters: a few words together work well.')
  .max(200, 'Use at most 200 characters.')

export const personName = z.string({ required_error: 'Enter a name.' }).trim()
  .min(1, 'Enter a name.').max(120, 'Use at most 120 characters.')

export const id = z.string().trim().min(1).max(64)
export const idParams = z.object({ id })

export const optionalText = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`)
  .optional().nullable().transform(v => (v ? v : null))

/**
 * A number from JSON or a form field: a number, or text holding one (what an input gives). Never a boolean, null,
 * blank text or an array, which z.coerce.number would turn into 1, 0 or 0 (true stored as 1 MB, a blank as 0 days).
 */
export function toNumberIfNumeric(v: unknown): unknown {
  return typeof v === 'string' && v.trim() !== '' && Number.isFinite(Number(v)) ? Number(v) : v
}
export const numeric = <T extends z.ZodTypeAny>(schema: T) => z.preprocess(toNumberIfNumeric, schema)

/**
 * Dates a person can mean on any form of ours (a birth, a payment, a session, a due day): years 1900 to 2200
 * (our own bounds, common practice); a field that needs others says so. Year 0000 or 9999 is a typing slip.
 */
export const MIN_YEAR = 1900
export const MAX_YEAR = 2200
export const YEAR_RANGE_MESSAGE = `Use a date between the years ${MIN_YEAR} and ${MAX_YEAR}.`
/** The year of an ISO 8601 date or date-time text (its first four digits) lies within MIN_YEAR..MAX_YEAR. */
export function yearInRange(s: string): boolean {
  const y = Number(s.slice(0, 4))
  return Number.isInteger(y) && y >= MIN_YEAR && y <= MAX_YEAR
}

/** A calendar date as YYYY-MM-DD that really exists (2026-02-30 is refused), in the years 1900 to 2200. */
export const isoDate = z.string({ invalid_type_error: 'Use a date like 2026-03-31.' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-03-31.')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`)
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s
  }, 'This date does not exist on the calendar.')
  .refine(yearInRange, YEAR_RANGE_MESSAGE)
