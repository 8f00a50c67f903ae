import { z } from 'zod'
import { CLIENT_STATUSES, CONDITIONS, HANDLER_RELATIONSHIPS } from '../utils/enums'
import { email, isoDate, numeric, optionalText, personName } from './common'

export const CLIENT_SORTS = ['household', 'person', 'dog', 'condition', 'status', 'started', 'updated', 'trainer'] as const

export const clientListQuery = z.object({
  q: z.string().trim().max(100, 'Search with at most 100 characters.').optional(),
  condition: z.enum(CONDITIONS, { errorMap: () => ({ message: `Condition is one of: ${CONDITIONS.join(', ')}.` }) }).optional(),
  status: z.enum(CLIENT_STATUSES, { errorMap: () => ({ message: `Stage is one of: ${CLIENT_STATUSES.join(', ')}.` }) }).optional(),
  trainerId: z.string().max(64).optional(),
  sort: z.enum(CLIENT_SORTS, { errorMap: () => ({ message: `Sort by one of: ${CLIENT_SORTS.join(', ')}.` }) }).default('household'),
  dir: z.enum(['asc', 'desc'], { errorMap: () => ({ message: 'Direction is asc or desc.' }) }).default('asc'),
  page: numeric(z.number().int('Page must be a whole number.').min(1, 'Pages start at 1.').max(100000).default(1)),
  pageSize: numeric(z.number().int().min(5, 'Show at least 5 rows.').max(200, 'Show at most 200 rows.').default(25)),
})
export type ClientListQuery = z.infer<typeof clientListQuery>

const phone = z.string().trim().max(40, 'Use at most 40 characters.').regex(/^[+()\d\s./-]*$/, 'Use digits, spaces and + ( ) - only.')
  .optional().nullable().transform(v => (v ? v : null))
const optionalEmail = z.union([z.literal(''), email]).optional().nullable().transform(v => (v ? v : null))

/** Contact details: what the trainer and the household's handlers may edit. */
export const clientContactSchema = z.object({
  email: optionalEmail,
  phone,
  addressLine: optionalText(200),
  town: optionalText(100),
  postcode: optionalText(20),
})

/** The household's file, as the trainer keeps it. */
export const clientFileSchema = clientContactSchema.extend({
  householdName: z.string({ required_error: 'Name the household, e.g. "Rivers household".' }).trim().min(1, 'Name the household, e.g. "Rivers household".').max(120, 'Use at most 120 characters.'),
  personName,
  condition: z.enum(CONDITIONS, { errorMap: () => ({ message: 'Choose the condition the dog is trained for.' }) }),
  conditionDetail: optionalText(200),
  clinicianName: optionalText(120),
  clinicianContact: optionalText(200),
  earlySigns: optionalText(1000),
  episodeFrequency: optionalText(200),
  usualOnset: optionalText(200),
  notes: optionalText(4000),
})

export const clientUpdateSchema = clientFileSchema.partial().extend({
  status: z.enum(CLIENT_STATUSES).optional(),
  programmeStartedOn: isoDate.optional().nullable(),
})

/** Intake: a new client file, its trainer (the admin chooses; a trainer takes it), and optionally the first handler. */
export const intakeSchema = clientFileSchema.extend({
  trainerId: z.string().max(64).optional().transform(v => (v ? v : undefined)),
  inviteHandler: z.boolean().default(true),
  handlerName: z.string().trim().max(120, 'Use at most 120 characters.').optional(),
  handlerEmail: z.union([z.literal(''), email]).optional(),
  handlerRelationship: z.enum(HANDLER_RELATIONSHIPS).default('self'),
}).superRefine((v, ctx) => {
  if (!v.inviteHandler) return
  if (!v.handlerName) ctx.addIssue({ code: 'custom', path: ['handlerName'], message: 'Enter the handler\'s name, or untick "Invite a handler now".' })
  if (!v.handlerEmail) ctx.addIssue({ code: 'custom', path: ['handlerEmail'], message: 'Enter the handler\'s e-mail, or untick "Invite a handler now".' })
})
export type IntakeInput = z.infer<typeof intakeSchema>

export const reassignSchema = z.object({
  trainerId: z.string({ required_error: 'Choose the new trainer.' }).min(1, 'Choose the new trainer.').max(64),
  note: optionalText(500),
})

export const activityQuery = z.object({
  before: numeric(z.number().int().positive().optional()),
  limit: numeric(z.number().int().min(1).max(100).default(30)),
})

/** Who a client's invoices are addressed to; each empty field falls back to the household's contact details. */
export const clientBillingSchema = z.object({
  billingName: optionalText(160),
  billingAddressLine: optionalText(200),
  billingTown: optionalText(100),
  billingPostcode: optionalText(20),
  billingCountry: z.string().trim().toUpperCase().regex(/^([A-Z]{2})?$/, 'Use a two-letter country code, like GB (ISO 3166-1).').default(''),
})
export type BillingInput = z.infer<typeof clientBillingSchema>
