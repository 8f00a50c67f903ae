import { idParams } from '../../../../shared/schemas/common'
import { diaryReviewSchema } from '../../../../shared/schemas/diary'

// Marks an alert as reviewed with the trainer's comment (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, entry } = await requireDiaryEntryAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, diaryReviewSchema)
  return reviewDiaryAlert(user, entry, input)
})
