import { idParams } from '../../../shared/schemas/common'
import { diaryEntryUpdateSchema } from '../../../shared/schemas/diary'

// Adjusts the time or adds the details of a diary entry (the household's handlers, the trainer, the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, entry } = await requireDiaryEntryAccess(event, id)
  const input = await readValidatedJson(event, diaryEntryUpdateSchema)
  return updateDiaryEntry(user, entry, input)
})
