import { exerciseSchema } from '../../../shared/schemas/homework'

// Adds an exercise to the library (trainer, admin).
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'trainer', 'admin')
  const input = await readValidatedJson(event, exerciseSchema)
  setResponseStatus(event, 201)
  return createHomeworkExercise(user, input)
})
