// A few words about one practice of a homework, written on the phone after practising (often with no signal).
import { z } from 'zod'
import { yearInRange, YEAR_RANGE_MESSAGE } from './common'

export const homeworkNoteSchema = z.object({
  body: z.string({ required_error: 'Write how the practice went.', invalid_type_error: 'Write how the practice went.' }).trim()
    .min(1, 'Write how the practice went.').max(2000, 'Use at most 2000 characters.'),
  /** When the practice happened; left out: the moment of the tap (X-Tapped-At), or when it arrives. */
  practisedAt: z.string().datetime({ offset: true, message: 'Enter when you practised as a date and time.' })
    .refine(yearInRange, YEAR_RANGE_MESSAGE).transform(s => new Date(s)).optional(),
}).strict()
export type HomeworkNoteInput = z.infer<typeof homeworkNoteSchema>
