import { idParams } from '../../../../shared/schemas/common'
import { reviewSchema } from '../../../../shared/schemas/homework'

// Reviews a video: approved or try again, notes, optionally the next homework; e-mails the household (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, video, assignment, client } = await requireHomeworkVideoAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, reviewSchema)
  return reviewHomeworkVideo(user, video, assignment, client, input)
})
