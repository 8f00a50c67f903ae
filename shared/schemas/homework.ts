// Zod schemas for homework: the exercise library, assignments, timed comments, reviews and the review queue's query
// (the forms and the routes share these).
import { z } from 'zod'
import { MAX_EXPECTED_VIDEOS, REVIEW_OUTCOMES } from '../utils/homework'
import { id, isoDate, numeric, optionalText } from './common'

const title = z.string({ required_error: 'Give the homework a title.', invalid_type_error: 'Give the homework a title.' }).trim()
  .min(1, 'Give the homework a title.').max(120, 'Use at most 120 characters.')
const instructions = z.string({ required_error: 'Write what the handler should do.', invalid_type_error: 'Write what the handler should do.' }).trim()
  .min(1, 'Write what the handler should do.').max(4000, 'Use at most 4000 characters.')
const expectedVideos = numeric(z.number({ invalid_type_error: 'Enter how many videos you expect.' })
  .int('Use a whole number of videos.').min(1, 'Expect at least 1 video.').max(MAX_EXPECTED_VIDEOS, `Expect at most ${MAX_EXPECTED_VIDEOS} videos.`))
/** An empty form field counts as not given. */
const blank = <T extends z.ZodTypeAny>(schema: T) => z.preprocess(v => (v === '' || v === null ? undefined : v), schema.optional())
const optionalId = z.union([id, z.literal('')]).optional().nullable().transform(v => (v ? v : null))

export const exerciseSchema = z.object({ title, instructions, expectedVideos })
export type ExerciseInput = z.infer<typeof exerciseSchema>
export const exerciseUpdateSchema = exerciseSchema.partial()

const assignmentFields = {
  exerciseId: optionalId,
  milestoneId: optionalId,
  dueDay: isoDate,
  title: blank(title),
  instructions: blank(instructions),
  expectedVideos: blank(expectedVideos),
}

/** New homework for a household: from an exercise (its title, instructions and videos unless given) or from scratch. */
export const assignmentCreateSchema = z.object(assignmentFields).superRefine((a, ctx) => {
  if (a.exerciseId) return
  if (!a.title) ctx.addIssue({ code: 'custom', path: ['title'], message: 'Give the homework a title, or start from an exercise.' })
  if (!a.instructions) ctx.addIssue({ code: 'custom', path: ['instructions'], message: 'Write what the handler should do, or start from an exercise.' })
})
export type AssignmentCreateInput = z.infer<typeof assignmentCreateSchema>

export const assignmentUpdateSchema = z.object({
  title: title.optional(),
  instructions: instructions.optional(),
  /** Left out: unchanged; null or "": no milestone. */
  milestoneId: z.union([id, z.literal(''), z.null()]).optional().transform(v => (v === '' ? null : v)),
  dueDay: isoDate.optional(),
  expectedVideos: expectedVideos.optional(),
})
export type AssignmentUpdateInput = z.infer<typeof assignmentUpdateSchema>

export const assignmentCancelSchema = z.object({ reason: optionalText(500) })

export const commentSchema = z.object({
  atSeconds: z.number({ required_error: 'Say at which moment of the video the comment belongs.', invalid_type_error: 'Give the moment of the video as a number of seconds.' })
    .min(0, 'A comment cannot be before the start of the video.').max(86_400, 'Use a moment inside the video.'),
  body: z.string({ required_error: 'Write the comment.' }).trim().min(1, 'Write the comment.').max(1000, 'Use at most 1000 characters.'),
})
export type CommentInput = z.infer<typeof commentSchema>

export const reviewSchema = z.object({
  outcome: z.enum(REVIEW_OUTCOMES, { errorMap: () => ({ message: 'Choose approved or try again.' }) }),
  notes: optionalText(2000),
  /** Optionally set the next homework in the same step. */
  next: z.object(assignmentFields).superRefine((a, ctx) => {
    if (a.exerciseId) return
    if (!a.title) ctx.addIssue({ code: 'custom', path: ['title'], message: 'Choose an exercise or give the next homework a title.' })
    if (!a.instructions) ctx.addIssue({ code: 'custom', path: ['instructions'], message: 'Choose an exercise or write what to do next.' })
  }).nullable().optional().transform(v => v ?? null),
}).superRefine((r, ctx) => {
  if (r.outcome === 'try_again' && !r.notes) ctx.addIssue({ code: 'custom', path: ['notes'], message: 'Tell the handler what to change for the next try.' })
})
export type ReviewInput = z.infer<typeof reviewSchema>

export const queueQuerySchema = z.object({
  clientId: id.optional(),
  state: z.enum(['awaiting', 'overdue', 'reviewed', 'all']).default('awaiting'),
  outcome: z.enum(REVIEW_OUTCOMES).optional(),
  page: numeric(z.number().int().min(1).max(10_000).default(1)),
  pageSize: numeric(z.number().int().min(1).max(100).default(25)),
})
export type QueueQuery = z.infer<typeof queueQuerySchema>
