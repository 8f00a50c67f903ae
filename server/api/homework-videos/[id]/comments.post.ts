import { idParams } from '../../../../shared/schemas/common'
import { commentSchema } from '../../../../shared/schemas/homework'

// Pins a comment to a moment of the video (trainer, admin); a moment past the video's end is refused.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, video } = await requireHomeworkVideoAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, commentSchema)
  setResponseStatus(event, 201)
  return addHomeworkComment(user, video, input)
})
