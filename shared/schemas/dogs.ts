// The dog-profile forms: one schema each, used by the page form and by the route.
import { z } from 'zod'
import { DOG_SEXES, DOG_SOURCES, DOG_STATUSES } from '../utils/enums'
import {
  ASSESSMENT_OUTCOMES, HEALTH_RECORD_KINDS, SUITABILITY_TRAITS, TRAIT_SCORE_MAX, TRAIT_SCORE_MIN,
  assessmentSummary, isCalendarDay, type TraitKey,
} from '../utils/dogs'
import { optionalText, YEAR_RANGE_MESSAGE, yearInRange } from './common'

/**
 * ISO 11784 / ISO 11785 (FDX-B) animal transponders carry a 15-digit code: a 3-digit country or manufacturer code
 * and a 12-digit national number (ISO 11784:1996, from memory). Spaces, dots and hyphens people type are dropped.
 */
export const MICROCHIP_DIGITS = 15
export function normalizeMicrochip(input: string): string {
  return input.replace(/[\s.-]/g, '')
}
export function isValidMicrochip(input: string): boolean {
  return new RegExp(`^\\d{${MICROCHIP_DIGITS}}$`).test(normalizeMicrochip(input))
}

const blankToNull = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? null : v)

const calendarDay = (message: string) => z.string({ required_error: message, invalid_type_error: message }).trim()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-03-31.')
  .refine(isCalendarDay, 'This date does not exist on the calendar.')
  .refine(yearInRange, YEAR_RANGE_MESSAGE)
const optionalDay = z.preprocess(blankToNull, calendarDay('Use a date like 2026-03-31.').nullable().optional())

const optionalEnum = <T extends readonly [string, ...string[]]>(values: T, message: string) =>
  z.preprocess(blankToNull, z.enum(values, { errorMap: () => ({ message }) }).nullable().optional())

export const microchip = z.preprocess(
  v => (typeof v === 'string' ? (normalizeMicrochip(v) || null) : v),
  z.string().regex(new RegExp(`^\\d{${MICROCHIP_DIGITS}}$`), `A microchip number has ${MICROCHIP_DIGITS} digits (ISO 11784). Check the number on the chip record.`)
    .nullable().optional(),
)

const dogFields = {
  name: z.string({ required_error: "Enter the dog's name." }).trim().min(1, "Enter the dog's name.").max(60, 'Use at most 60 characters.'),
  breed: optionalText(80),
  sex: optionalEnum(DOG_SEXES, 'Choose female or male.'),
  dateOfBirth: optionalDay,
  microchip,
  source: optionalEnum(DOG_SOURCES, "Choose where the dog comes from: the client's own dog, programme-bred or rescue."),
  notes: optionalText(2000),
}

/** Editing a dog's details (the status has its own form, with its date). */
export const dogFieldsSchema = z.object(dogFields)
export type DogFieldsInput = z.infer<typeof dogFieldsSchema>

/** A new dog on a client file; its history starts with 'assessment' on `startedOn` (today when left empty). */
export const dogCreateSchema = dogFieldsSchema.extend({ startedOn: optionalDay })
export type DogCreateInput = z.infer<typeof dogCreateSchema>

/** PATCH: only the fields sent change; an empty value clears an optional field. */
export const dogUpdateSchema = dogFieldsSchema.partial().strict('Only the name, breed, sex, date of birth, microchip, source and notes can be edited here.')
  .refine(v => Object.keys(v).length > 0, 'Nothing to change: send at least one field.')
export type DogUpdateInput = z.infer<typeof dogUpdateSchema>

export const dogStatusChangeSchema = z.object({
  status: z.enum(DOG_STATUSES, { errorMap: () => ({ message: 'Choose the new status.' }) }),
  effectiveOn: calendarDay('Enter the date of the change.'),
  note: optionalText(1000),
})
export type DogStatusChangeInput = z.infer<typeof dogStatusChangeSchema>

const healthFields = {
  kind: z.enum(HEALTH_RECORD_KINDS, { errorMap: () => ({ message: 'Choose the kind of record.' }) }),
  name: z.string({ required_error: 'Name it, e.g. "Rabies" or "Hip score".' }).trim().min(1, 'Name it, e.g. "Rabies" or "Hip score".').max(80, 'Use at most 80 characters.'),
  doneOn: calendarDay('Enter the date it was done.'),
  dueOn: optionalDay,
  note: optionalText(1000),
}
const dueAfterDone = (v: { doneOn?: string | null, dueOn?: string | null }) => !v.doneOn || !v.dueOn || v.dueOn >= v.doneOn
const DUE_AFTER_DONE = { message: 'The renewal date must be on or after the date it was done.', path: ['dueOn'] }

export const healthRecordSchema = z.object(healthFields).refine(dueAfterDone, DUE_AFTER_DONE)
export type HealthRecordInput = z.infer<typeof healthRecordSchema>

/** PATCH: only the fields sent change (the route checks the renewal date against the stored one too). */
export const healthRecordUpdateSchema = z.object(healthFields).partial().strict('Only the kind, name, dates and note of a health record can be edited.')
  .refine(v => Object.keys(v).length > 0, 'Nothing to change: send at least one field.')
  .refine(dueAfterDone, DUE_AFTER_DONE)
export type HealthRecordUpdateInput = z.infer<typeof healthRecordUpdateSchema>

const traitScore = (label: string) => z.number({
  required_error: `Score ${label.toLowerCase()} from ${TRAIT_SCORE_MIN} to ${TRAIT_SCORE_MAX}.`,
  invalid_type_error: `Score ${label.toLowerCase()} from ${TRAIT_SCORE_MIN} to ${TRAIT_SCORE_MAX}.`,
}).int(`Use a whole score from ${TRAIT_SCORE_MIN} to ${TRAIT_SCORE_MAX}.`)
  .min(TRAIT_SCORE_MIN, `Use a score from ${TRAIT_SCORE_MIN} to ${TRAIT_SCORE_MAX}.`)
  .max(TRAIT_SCORE_MAX, `Use a score from ${TRAIT_SCORE_MIN} to ${TRAIT_SCORE_MAX}.`)

export const traitScoresSchema = z.object(
  Object.fromEntries(SUITABILITY_TRAITS.map(t => [t.key, traitScore(t.label)])) as Record<TraitKey, ReturnType<typeof traitScore>>,
  { required_error: 'Score every trait.', invalid_type_error: 'Score every trait.' },
).strict('Score only the listed traits.')

export const assessmentSchema = z.object({
  assessedOn: calendarDay('Enter the date of the assessment.'),
  scores: traitScoresSchema,
  notes: optionalText(4000),
  outcome: z.enum(ASSESSMENT_OUTCOMES, { errorMap: () => ({ message: 'Choose the outcome: accept, decline or assess again.' }) }),
}).superRefine((v, ctx) => {
  // Accepting a dog despite a weak trait is the trainer's call, but it is written down (our own rule).
  if (v.outcome === 'accept' && !v.notes && assessmentSummary(v.scores).anyBelowMinimum) {
    ctx.addIssue({ code: 'custom', path: ['notes'], message: 'A trait is scored below 3: say in the notes why you accept the dog anyway.' })
  }
})
export type AssessmentInput = z.infer<typeof assessmentSchema>
