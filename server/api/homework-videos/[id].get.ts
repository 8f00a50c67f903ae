import { idParams } from '../../../shared/schemas/common'

// One video with its homework, timed comments and review (the household, the trainer, the office).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, video, assignment, client } = await requireHomeworkVideoAccess(event, id)
  return getHomeworkVideoDetail(user, video, assignment, client)
})
