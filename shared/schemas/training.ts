// Zod schemas for programmes, milestones, training sessions and trials (pages and routes share these).
import { z } from 'zod'
import { TRAINING_STAGES } from '../utils/enums'
import { SESSION_RUNNERS } from '../utils/training'
import { id, isoDate, optionalText } from './common'

export const MAX_STATIONS = 12 // our own limit: a line-up on a training ground rarely has more than 6–8 stations

const whole = (what: string, min: number, max: number) => z.coerce.number({ invalid_type_error: `Enter ${what}.` })
  .int(`Use a whole number for ${what}.`).min(min, `Use at least ${min} for ${what}.`).max(max, `Use at most ${max} for ${what}.`)
const percent = (what: string) => z.coerce.number({ invalid_type_error: `Enter ${what} in percent.` })
  .min(0, `Use 0 to 100 percent for ${what}.`).max(100, `Use 0 to 100 percent for ${what}.`)

export const criteriaSchema = z.object({
  windowDays: whole('the window (days)', 7, 365),
  minTrials: whole('the number of trials', 1, 1000),
  minSessions: whole('the number of sessions', 1, 200),
  minDays: whole('the number of days', 1, 200),
  minBlindPercent: percent('the blind share'),
  minSensitivityLowerPercent: percent('the sensitivity lower bound'),
  minSpecificityLowerPercent: percent('the specificity lower bound'),
})

export const programmeCreateSchema = z.object({ templateId: id })

/** A trainer tightens a measured milestone's criteria for this client (null: back to the business's defaults). */
export const milestoneCriteriaSchema = z.object({ criteria: criteriaSchema.nullable() })

export const milestoneConfirmSchema = z.object({
  reason: optionalText(1000),
})

const station = z.number({ invalid_type_error: 'Use a station number.' }).int('Use a station number.').min(1, 'Stations are numbered from 1.').nullable()

export const trialSchema = z.object({
  stations: z.number({ required_error: 'Enter how many stations the line-up had.', invalid_type_error: 'Enter how many stations the line-up had.' })
    .int('Use a whole number of stations.').min(1, 'A trial has at least 1 station.').max(MAX_STATIONS, `Use at most ${MAX_STATIONS} stations.`),
  targetStation: station,
  indicatedStation: station,
  latencySeconds: z.number({ invalid_type_error: 'Enter the latency in seconds.' }).min(0, 'Latency cannot be negative.').max(3600, 'Use at most 3600 seconds.').nullable().optional().transform(v => v ?? null),
  notes: optionalText(500),
}).superRefine((t, ctx) => {
  if (t.targetStation !== null && t.targetStation > t.stations) ctx.addIssue({ code: 'custom', path: ['targetStation'], message: `The target must be at one of the ${t.stations} stations.` })
  if (t.indicatedStation !== null && t.indicatedStation > t.stations) ctx.addIssue({ code: 'custom', path: ['indicatedStation'], message: `There is no station ${t.indicatedStation}: this line-up has ${t.stations}.` })
})
export type TrialInput = z.infer<typeof trialSchema>

export const sessionCreateSchema = z.object({
  dogId: id,
  runBy: z.enum(SESSION_RUNNERS).optional(),
  day: isoDate,
  place: optionalText(120),
  stage: z.enum(TRAINING_STAGES, { errorMap: () => ({ message: 'Choose the stage the session trained.' }) }),
  conditions: optionalText(300),
  notes: optionalText(1000),
  blind: z.boolean({ required_error: 'Say whether the session ran blind.' }),
  trials: z.array(trialSchema).max(200, 'Use at most 200 trials in one session.').default([]),
})
export type SessionCreateInput = z.infer<typeof sessionCreateSchema>

export const templateMilestoneSchema = z.object({
  name: z.string({ required_error: 'Name the milestone.' }).trim().min(2, 'Name the milestone (at least 2 characters).').max(80, 'Use at most 80 characters.'),
  handlerText: z.string({ required_error: 'Describe the milestone for the handler.' }).trim().min(5, 'Describe the milestone for the handler (at least 5 characters).').max(500, 'Use at most 500 characters.'),
  measured: z.boolean().default(false),
})
export const templateUpdateSchema = z.object({
  name: z.string({ required_error: 'Name the template.' }).trim().min(2, 'Name the template (at least 2 characters).').max(80, 'Use at most 80 characters.'),
  milestones: z.array(templateMilestoneSchema).min(1, 'A programme has at least one milestone.').max(30, 'Use at most 30 milestones.'),
})
export type TemplateUpdateInput = z.infer<typeof templateUpdateSchema>
