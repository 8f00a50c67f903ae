import { queueQuerySchema } from '../../../shared/schemas/homework'

// The review queue across the trainer's clients (the office: all), waiting videos first, oldest first.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'trainer', 'admin')
  const q = getValidatedQueryParams(event, queueQuerySchema)
  return listHomeworkReviewQueue(user, q)
})
