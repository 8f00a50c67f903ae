import { idParams } from '../../../shared/schemas/common'
import { exerciseUpdateSchema } from '../../../shared/schemas/homework'

// Changes an exercise (the trainer who wrote it, or the office). Homework already set keeps its own text.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, exercise } = await requireHomeworkExerciseAccess(event, id)
  const input = await readValidatedJson(event, exerciseUpdateSchema)
  return updateHomeworkExercise(user, exercise, input)
})
