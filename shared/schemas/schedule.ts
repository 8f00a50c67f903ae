// Forms and routes of the working day: appointments, the calendar's range, messages and reminder choices.
import { z } from 'zod'
import { APPOINTMENT_KINDS, MAX_DURATION_MINUTES, MAX_SERIES_EVERY_WEEKS, MIN_DURATION_MINUTES, clockMinutes } from '../utils/schedule'
import { REMINDER_KINDS } from '../utils/reminders'
import { id, isoDate, optionalText } from './common'

export const wallClock = z.string({ required_error: 'Enter a time like 09:30.', invalid_type_error: 'Enter a time like 09:30.' })
  .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Enter a time like 09:30 (24-hour clock).')

const durationMinutes = z.number({ invalid_type_error: 'Enter the length in minutes.' }).int('Use whole minutes.')
  .min(MIN_DURATION_MINUTES, `An appointment lasts at least ${MIN_DURATION_MINUTES} minutes.`)
  .max(MAX_DURATION_MINUTES, 'An appointment lasts at most 12 hours: book two if the day is longer.')

export const repeatSchema = z.object({
  everyWeeks: z.number({ invalid_type_error: 'Enter how many weeks apart.' }).int('Use whole weeks.')
    .min(1, 'Repeat every 1 week or more.').max(MAX_SERIES_EVERY_WEEKS, `Repeat at most every ${MAX_SERIES_EVERY_WEEKS} weeks.`),
  count: z.number({ invalid_type_error: 'Enter a number of visits.' }).int('Use a whole number of visits.').min(2, 'A series has at least 2 visits.').max(200, 'Use at most 200 visits.').nullable().optional(),
  untilDate: isoDate.nullable().optional(),
})

/** Start, and either an end time on the same day or a length in minutes. */
const timing = {
  date: isoDate,
  time: wallClock,
  endTime: wallClock.optional(),
  durationMinutes: durationMinutes.optional(),
}
function checkTiming(v: { time?: string, endTime?: string, durationMinutes?: number }, ctx: z.RefinementCtx, required: boolean) {
  if (v.endTime !== undefined && v.durationMinutes !== undefined) {
    ctx.addIssue({ code: 'custom', path: ['endTime'], message: 'Give an end time or a length, not both.' })
  }
  if (required && v.endTime === undefined && v.durationMinutes === undefined) {
    ctx.addIssue({ code: 'custom', path: ['endTime'], message: 'Enter when the appointment ends.' })
  }
  if (v.endTime !== undefined && v.time !== undefined) {
    const length = clockMinutes(v.endTime) - clockMinutes(v.time)
    if (length <= 0) ctx.addIssue({ code: 'custom', path: ['endTime'], message: `The end (${v.endTime}) must be after the start (${v.time}).` })
    else if (length < MIN_DURATION_MINUTES) ctx.addIssue({ code: 'custom', path: ['endTime'], message: `An appointment lasts at least ${MIN_DURATION_MINUTES} minutes.` })
  }
}

export const appointmentCreateSchema = z.object({
  clientId: id,
  dogId: id.nullable().optional(),
  kind: z.enum(APPOINTMENT_KINDS, { errorMap: () => ({ message: 'Choose what kind of appointment this is.' }) }),
  ...timing,
  place: optionalText(200),
  householdNotes: optionalText(2000),
  privateNotes: optionalText(2000),
  repeat: repeatSchema.nullable().optional(),
}).strict().superRefine((v, ctx) => checkTiming(v, ctx, true))
export type AppointmentCreateInput = z.infer<typeof appointmentCreateSchema>

/** A text field of a change: absent leaves it as it is, empty clears it. */
const changedText = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`).nullable().optional()
  .transform(v => (v === undefined ? undefined : v || null))

export const APPOINTMENT_SCOPES = ['one', 'following'] as const
export const appointmentUpdateSchema = z.object({
  scope: z.enum(APPOINTMENT_SCOPES, { errorMap: () => ({ message: 'Choose this visit only, or this and the following visits.' }) }).default('one'),
  kind: z.enum(APPOINTMENT_KINDS, { errorMap: () => ({ message: 'Choose what kind of appointment this is.' }) }).optional(),
  dogId: id.nullable().optional(),
  date: isoDate.optional(),
  time: wallClock.optional(),
  endTime: wallClock.optional(),
  durationMinutes: durationMinutes.optional(),
  place: changedText(200),
  householdNotes: changedText(2000),
  privateNotes: changedText(2000),
}).strict().superRefine((v, ctx) => checkTiming(v, ctx, false))
export type AppointmentUpdateInput = z.infer<typeof appointmentUpdateSchema>

export const appointmentCancelSchema = z.object({
  scope: z.enum(APPOINTMENT_SCOPES, { errorMap: () => ({ message: 'Choose this visit only, or this and the following visits.' }) }).default('one'),
  reason: optionalText(300),
}).strict()
export type AppointmentCancelInput = z.infer<typeof appointmentCancelSchema>

/** The calendar's range: at most 62 days at once. */
export const appointmentListQuery = z.object({
  from: isoDate,
  to: isoDate,
  trainerId: id.optional(),
  clientId: id.optional(),
  includeCancelled: z.enum(['true', 'false']).optional().transform(v => v === 'true'),
}).refine(q => q.to >= q.from, { message: 'The range must end on or after its first day.', path: ['to'] })
  .refine(q => (Date.parse(q.to) - Date.parse(q.from)) / 86_400_000 <= 62, { message: 'Ask for at most 62 days at once.', path: ['to'] })

export const MAX_MESSAGE_CHARS = 10_000
export const messageBody = z.string({ required_error: 'Write a message.', invalid_type_error: 'Write a message.' }).trim()
  .min(1, 'Write a message.').max(MAX_MESSAGE_CHARS, 'A message is at most 10,000 characters: split it in two, or attach a PDF.')
export const messageCreateSchema = z.object({
  body: messageBody,
  homeworkVideoId: id.nullable().optional(),
}).strict()
export type MessageCreateInput = z.infer<typeof messageCreateSchema>

export const reminderPreferencesSchema = z.object(
  Object.fromEntries(REMINDER_KINDS.map(k => [k, z.boolean({ invalid_type_error: 'Choose on or off.' }).optional()])) as Record<(typeof REMINDER_KINDS)[number], z.ZodOptional<z.ZodBoolean>>,
).strict()
export type ReminderPreferencesInput = z.infer<typeof reminderPreferencesSchema>
