import { idParams } from '../../../shared/schemas/common'

// Removes a timed comment (trainer, admin); the audit log keeps what it said.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, comment, video } = await requireHomeworkCommentAccess(event, id)
  return deleteHomeworkComment(user, comment, video)
})
