import { idParams } from '../../../../shared/schemas/common'
import { diaryEntryCreateSchema } from '../../../../shared/schemas/diary'

// Logs an alert or an episode (the household's handlers, and the trainer or admin on their behalf).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const input = await readValidatedJson(event, diaryEntryCreateSchema)
  const entry = await createDiaryEntry(user, client, input)
  setResponseStatus(event, 201)
  return entry
})
