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

/** A calendar date as YYYY-MM-DD that really exists (2026-02-30 is refused). */
export const isoDate = z.string({ invalid_type_error: 'Use a date like 2026-03-31.' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-03-31.')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`)
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s
  }, 'This date does not exist on the calendar.')
