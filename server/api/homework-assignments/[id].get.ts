import { idParams } from '../../../shared/schemas/common'

// One assignment with its instructions, videos, review state and comments (the household, the trainer, the office).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, assignment, client } = await requireHomeworkAssignmentAccess(event, id)
  return getHomeworkAssignmentDetail(user, assignment, client)
})
