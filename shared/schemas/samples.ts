// Request bodies of the sample-bank routes, shared by the forms and the server. Times travel as ISO 8601 strings
// with an offset (what `new Date().toISOString()` gives) and come out as Dates; the protocol rules themselves are in
// shared/utils/samples.ts, checked on the server against the business's policy.
import { z } from 'zod'
import { yearInRange, YEAR_RANGE_MESSAGE } from './common'
import { EXPOSURES, SAMPLE_KINDS } from '../utils/samples'
import { isPhoneBagCode } from '../utils/bag-codes'
import { TRAINING_STAGES } from '../utils/enums'

const instant = (what: string) => z.string({ required_error: `Enter ${what}.`, invalid_type_error: `Enter ${what}.` })
  .datetime({ offset: true, message: `Enter ${what} as a date and time.` })
  .refine(yearInRange, YEAR_RANGE_MESSAGE)
  .transform(s => new Date(s))
const optionalInstant = (what: string) => instant(what).nullable().optional()
const reason = (what: string) => z.string({ required_error: `Enter ${what}.` }).trim().min(3, `Enter ${what} (at least 3 characters).`).max(500, 'Use at most 500 characters.')

export const sampleKind = z.enum(SAMPLE_KINDS, { errorMap: () => ({ message: 'Choose target or control.' }) })

/** The checklist answers: a time for each "last…" question, null for "not in that time", or listed as unknown. */
export const collectionAnswersSchema = z.object({
  lastAteAt: optionalInstant('when you last ate'),
  lastDrankOtherThanWaterAt: optionalInstant('when you last drank something other than water'),
  lastBrushedTeethAt: optionalInstant('when you last brushed your teeth'),
  lastChewingGumAt: optionalInstant('when you last chewed gum'),
  lastAlcoholAt: optionalInstant('when you last drank alcohol'),
  lastSmokedAt: optionalInstant('when you last smoked'),
  lastWaterAt: optionalInstant('when you last drank water'),
  unknown: z.array(z.enum(EXPOSURES)).max(EXPOSURES.length).default([]),
  washedHandsUnscented: z.boolean({ required_error: 'Say whether hands were washed with unscented soap.' }),
})
export type CollectionAnswersInput = z.infer<typeof collectionAnswersSchema>

/**
 * A new collection. With `answers` left out it is a quick save (an episode is starting): the sample is kept, but
 * stays out of training until the checklist is completed.
 */
export const sampleCreateSchema = z.object({
  kind: sampleKind,
  collectedAt: instant('when the sample was collected'),
  firstSymptomsAt: optionalInstant('when the first symptoms began'),
  /** Targets: medication for this episode taken before collecting (null: not recorded). Ignored for controls. */
  medicationBefore: z.boolean({ invalid_type_error: 'Say yes or no: was medication taken before collecting?' }).nullable().optional(),
  rolls: z.number({ required_error: 'Enter how many cotton rolls are in the bag.', invalid_type_error: 'Enter the number of cotton rolls.' })
    .int('Enter the number of cotton rolls as a whole number.').min(1, 'A sample needs at least 1 cotton roll.').max(100, 'That is far too many rolls for one bag.'),
  answers: collectionAnswersSchema.optional(),
  notes: z.string().trim().max(1000, 'Use at most 1000 characters.').optional().nullable().transform(v => v || null),
  /** The code made on the phone and already written on the bag (shared/utils/bag-codes.ts); left out, the server makes one. */
  bagCode: z.string().trim().refine(v => isPhoneBagCode(v), 'The bag code must be one made by the Forescent app, like T-ABC2D.').optional(),
})
export type SampleCreateInput = z.infer<typeof sampleCreateSchema>

/** Completing (or correcting) the checklist of a collection. */
export const sampleAnswersSchema = z.object({
  answers: collectionAnswersSchema,
  collectedAt: instant('when the sample was collected').optional(),
  firstSymptomsAt: optionalInstant('when the first symptoms began'),
  medicationBefore: z.boolean({ invalid_type_error: 'Say yes or no: was medication taken before collecting?' }).nullable().optional(),
  rolls: z.number().int('Enter the number of cotton rolls as a whole number.').min(1).max(100).optional(),
})
export type SampleAnswersInput = z.infer<typeof sampleAnswersSchema>

/** Where the small bag went: an existing outer bag, or a new one (optionally into a container). */
export const sampleStoreSchema = z.union([
  z.object({ outerBagId: z.string().trim().min(1).max(64) }).strict(),
  z.object({
    newOuterBag: z.object({
      label: z.string().trim().max(40, 'Use at most 40 characters.').optional().nullable().transform(v => v || null),
      containerId: z.string().trim().min(1).max(64).nullable().optional().transform(v => v ?? null),
      /** Start a new container of the sample's kind for the new outer bag. */
      newContainerLabel: z.string().trim().min(1, 'Name the container, e.g. "Blue tub".').max(40, 'Use at most 40 characters.').optional(),
    }).refine(v => !(v.containerId && v.newContainerLabel), { message: 'Choose a container or start a new one, not both.', path: ['containerId'] }),
  }).strict(),
], { errorMap: () => ({ message: 'Choose an outer bag, or start a new one.' }) })
export type SampleStoreInput = z.infer<typeof sampleStoreSchema>

export const containerCreateSchema = z.object({
  kind: sampleKind,
  label: z.string({ required_error: 'Name the container, e.g. "Blue tub".' }).trim().min(1, 'Name the container, e.g. "Blue tub".').max(40, 'Use at most 40 characters.'),
})
export type ContainerCreateInput = z.infer<typeof containerCreateSchema>

export const outerBagMoveSchema = z.object({
  containerId: z.string().trim().min(1).max(64).nullable(),
})

export const useCreateSchema = z.object({
  outAt: instant('when the sample came out of the freezer'),
  backAt: optionalInstant('when it went back').transform(v => v ?? null),
  stage: z.enum(TRAINING_STAGES, { errorMap: () => ({ message: 'Choose the training stage of the session.' }) }),
  sessionRef: z.string().trim().max(80, 'Use at most 80 characters.').optional().nullable().transform(v => v || null),
  discarded: z.boolean().default(false),
  maintenanceSession: z.boolean().default(false),
})
export type UseCreateInput = z.infer<typeof useCreateSchema>

export const useCloseSchema = z.object({
  backAt: instant('when the sample went back in the freezer (or was thrown away)'),
  discarded: z.boolean().default(false),
})
export type UseCloseInput = z.infer<typeof useCloseSchema>

export const overrideSchema = z.object({ reason: reason('why this compromised sample may be used') })
export const discardSchema = z.object({ reason: reason('why the sample is thrown away') })

/** The trainer's choice for one household: keep flagged targets (late, or after medication) out of training. */
export const sampleSettingsSchema = z.object({
  excludeFlaggedTargets: z.boolean({ required_error: 'Say whether flagged targets are kept out of training.', invalid_type_error: 'Say yes (true) or no (false).' }),
}).strict()
export type SampleSettingsInput = z.infer<typeof sampleSettingsSchema>
