// Zod schemas for programmes, milestones, training sessions and trials (pages and routes share these).
import { z } from 'zod'
import { TRAINING_STAGES } from '../utils/enums'
import { SESSION_RUNNERS } from '../utils/training'
import { id, isoDate, numeric, optionalText } from './common'

export const MAX_STATIONS = 12 // our own limit: a line-up on a training ground rarely has more than 6–8 stations

const whole = (what: string, min: number, max: number) => numeric(z.number({ invalid_type_error: `Enter ${what}.` })
  .int(`Use a whole number for ${what}.`).min(min, `Use at least ${min} for ${what}.`).max(max, `Use at most ${max} for ${what}.`))
const percent = (what: string) => numeric(z.number({ invalid_type_error: `Enter ${what} in percent.` })
  .min(0, `Use 0 to 100 percent for ${what}.`).max(100, `Use 0 to 100 percent for ${what}.`))

export const criteriaSchema = z.object({
  windowDays: whole('the window (days)', 7, 365),
  minTrials: whole('the number of trials', 1, 1000),
  minSessions: whole('the number of sessions', 1, 200),
  minDays: whole('the number of days', 1, 200),
  minBlindPercent: percent('the blind share'),
  minSensitivityLowerPercent: percent('the sensitivity lower bound'),
  minSpecificityLowerPercent: percent('the specificity lower bound'),
})


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
  /** Made up by the device when the trial is tapped: the same trial sent twice is stored once (retry queue, reload). */
  entryKey: z.string({ invalid_type_error: 'The trial key must be text.' }).trim().min(8, 'The trial key is too short.').max(64, 'The trial key is too long.')
    .regex(/^[\w-]+$/, 'The trial key may hold letters, digits, - and _ only.').nullable().optional().transform(v => v ?? null),
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
  trials: z.array(trialSchema).max(200, 'Use at most 200 trials in one session.').default([])
    .refine(ts => new Set(ts.flatMap(t => (t.entryKey ? [t.entryKey] : []))).size === ts.filter(t => t.entryKey).length, 'Each trial needs its own key: two trials share one.'),
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

// Adjusting one client's programme (the trainer of the client, or the admin).
const milestoneName = templateMilestoneSchema.shape.name
const milestoneHandlerText = templateMilestoneSchema.shape.handlerText

/** Rename a milestone, edit what the handler reads, and/or tighten its criteria (null: back to the defaults). */
export const milestoneUpdateSchema = z.object({
  name: milestoneName.optional(),
  handlerText: milestoneHandlerText.optional(),
  criteria: criteriaSchema.nullable().optional(),
}).refine(v => v.name !== undefined || v.handlerText !== undefined || v.criteria !== undefined, { message: 'Change the name, the text for the handler or the criteria.' })
export type MilestoneUpdateInput = z.infer<typeof milestoneUpdateSchema>

/** A new milestone at a place in the programme (0-based; signed-off milestones stay first). */
export const milestoneAddSchema = z.object({
  name: milestoneName,
  handlerText: milestoneHandlerText,
  measured: z.boolean().default(false),
  position: z.number({ required_error: 'Choose where the milestone goes.', invalid_type_error: 'Choose where the milestone goes.' })
    .int('Choose where the milestone goes.').min(0, 'Choose where the milestone goes.').max(100, 'Choose where the milestone goes.'),
})
export type MilestoneAddInput = z.infer<typeof milestoneAddSchema>

/** The milestones not yet signed off, every one of them once, in their new order. */
export const milestoneOrderSchema = z.object({
  ids: z.array(id, { required_error: 'Send the milestones in their new order.' }).min(1, 'Send the milestones in their new order.').max(100, 'Too many milestones.'),
})

/** The session list across clients: server-side paging and filters. */
export const sessionListQuery = z.object({
  q: z.string().trim().max(100, 'Search with at most 100 characters.').optional(),
  clientId: id.optional(),
  dogId: id.optional(),
  runBy: z.enum(SESSION_RUNNERS, { errorMap: () => ({ message: 'Run by is trainer or handler.' }) }).optional(),
  blind: z.enum(['yes', 'no'], { errorMap: () => ({ message: 'Blind is yes or no.' }) }).optional(),
  from: isoDate.optional(),
  to: isoDate.optional(),
  page: numeric(z.number().int('Page must be a whole number.').min(1, 'Pages start at 1.').max(100000).default(1)),
  pageSize: numeric(z.number().int('Use a whole number of rows.').min(5, 'Show at least 5 rows.').max(100, 'Show at most 100 rows.').default(25)),
}).refine(v => !v.from || !v.to || v.from <= v.to, { path: ['to'], message: 'The end date must be on or after the start date.' })
export type SessionListQuery = z.infer<typeof sessionListQuery>

/** Archive a programme template (true) or bring it back (false). */
export const templateArchiveSchema = z.object({ archived: z.boolean({ required_error: 'Say whether to archive the template (true) or bring it back (false).', invalid_type_error: 'Use true or false.' }) })

export const templateListQuery = z.object({ archived: z.enum(['0', '1']).optional() })

/** Starting a client's programme: from this template, invoicing its fee plan now (the default) or leaving billing to the office. */
export const programmeStartSchema = z.object({
  templateId: id,
  billing: z.enum(['plan', 'none'], { errorMap: () => ({ message: 'Choose whether to invoice the fee plan now or bill by hand.' }) }).default('plan'),
})

export const programmePreviewQuery = z.object({ templateId: id })
