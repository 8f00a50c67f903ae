import { idParams } from '../../../shared/schemas/common'

// Archives an exercise: it leaves the library; homework set from it stays as it was.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, exercise } = await requireHomeworkExerciseAccess(event, id)
  return archiveHomeworkExercise(user, exercise)
})
