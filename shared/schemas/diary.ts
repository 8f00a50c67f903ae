// The alert diary's forms: one schema each, used by the phone flow, the detail forms and the routes.
import { z } from 'zod'
import { ALERT_CONFIDENCES, DIARY_KINDS, EARLIEST_DIARY_TIME, EPISODE_SEVERITIES, MAX_WINDOW_MINUTES, windowProblems } from '../utils/diary'
import { optionalText, YEAR_RANGE_MESSAGE, yearInRange } from './common'

const blankToNull = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? null : v)

/**
 * An instant as an ISO 8601 date-time WITH its offset or Z ("2026-05-04T09:30:00Z", "2026-05-04T10:30+01:00"):
 * without an offset the time would be ambiguous across time zones and daylight-saving changes. Stored as UTC.
 */
const instantText = z.string({ required_error: 'Enter the date and time.', invalid_type_error: 'Enter the date and time.' })
  .trim()
  .regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})$/, 'Use a date and time with its offset, like 2026-05-04T09:30:00Z.')
  .refine((s) => {
    // 2026-02-30T10:00Z parses in some engines by rolling over; compare the day written with the day parsed.
    const m = s.match(/^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/)
    if (!m) return true // the format's own message says what is wrong
    const [y, mo, d, h, mi] = m.slice(1).map(Number) as [number, number, number, number, number]
    const probe = new Date(Date.UTC(y, mo - 1, d, h, mi))
    if (Number.isNaN(Date.parse(s))) return false
    return probe.getUTCFullYear() === y && probe.getUTCMonth() === mo - 1 && probe.getUTCDate() === d && h < 24 && mi < 60
  }, 'This date and time does not exist on the calendar.')
  .refine(yearInRange, YEAR_RANGE_MESSAGE)
  .transform(s => new Date(s))
  .refine(d => d.getTime() >= EARLIEST_DIARY_TIME, 'Diary times start in the year 2000. Check the year.')

// A Date (a form's value once the schema has parsed it) is read as its ISO text; JSON never carries one.
export const diaryInstant = z.preprocess(
  v => (v instanceof Date ? (Number.isNaN(v.getTime()) ? 'invalid' : v.toISOString()) : v),
  instantText,
)

const optionalEnum = <T extends readonly [string, ...string[]]>(values: T, message: string) =>
  z.preprocess(blankToNull, z.enum(values, { errorMap: () => ({ message }) }).nullable().optional())

const detailFields = {
  // Alerts
  behaviour: optionalText(200),
  place: optionalText(200),
  confidence: optionalEnum(ALERT_CONFIDENCES, 'Choose how sure you were: not sure, fairly sure or sure.'),
  // Episodes
  severity: optionalEnum(EPISODE_SEVERITIES, 'Choose mild, moderate or severe.'),
  action: optionalText(500),
  // Both
  notes: optionalText(2000),
}
const ALERT_ONLY = ['behaviour', 'place', 'confidence'] as const
const EPISODE_ONLY = ['severity', 'action'] as const

/** A new entry: only the kind and time are needed (details can follow). */
export const diaryEntryCreateSchema = z.object({
  kind: z.enum(DIARY_KINDS, { errorMap: () => ({ message: 'Say whether this is an alert or an episode.' }) }),
  occurredAt: diaryInstant,
  ...detailFields,
}).strict('Only the kind, the time and the details of an entry can be sent.').superRefine((v, ctx) => {
  const wrong = v.kind === 'alert' ? EPISODE_ONLY : ALERT_ONLY
  for (const key of wrong) {
    if (v[key] !== undefined && v[key] !== null) ctx.addIssue({ code: 'custom', path: [key], message: `An ${v.kind} has no ${key}.` })
  }
})
export type DiaryEntryCreateInput = z.infer<typeof diaryEntryCreateSchema>

/** PATCH: only the fields sent change; the kind of an entry cannot change (delete it and log the other kind). */
export const diaryEntryUpdateSchema = z.object({ occurredAt: diaryInstant, ...detailFields }).partial()
  .strict('Only the time and the details of an entry can be changed; to change its kind, delete it and log it again.')
  .refine(v => Object.keys(v).length > 0, 'Nothing to change: send at least one field.')
export type DiaryEntryUpdateInput = z.infer<typeof diaryEntryUpdateSchema>

/** The trainer's review of an alert. */
export const diaryReviewSchema = z.object({
  comment: z.string({ required_error: 'Write a short comment for the review.' }).trim()
    .min(1, 'Write a short comment for the review.').max(1000, 'Use at most 1000 characters.'),
}).strict('Only a comment can be sent with a review.')
export type DiaryReviewInput = z.infer<typeof diaryReviewSchema>

const windowMinutes = (label: string) => z.number({ required_error: `Enter the ${label} in minutes.`, invalid_type_error: `Enter the ${label} in minutes.` })

/** A client's own warning window (minutes before onset). */
export const diaryWindowSchema = z.object({
  minMinutes: windowMinutes('nearest end of the window'),
  maxMinutes: windowMinutes('farthest end of the window'),
}).strict('Only minMinutes and maxMinutes can be sent.').superRefine((w, ctx) => {
  for (const [path, message] of Object.entries(windowProblems(w))) ctx.addIssue({ code: 'custom', path: [path], message })
})
export type DiaryWindowInput = z.infer<typeof diaryWindowSchema>
export { MAX_WINDOW_MINUTES }
