import { idParams } from '../../../shared/schemas/common'

// Deletes a diary entry logged by mistake; answers with the entry as it was (handlers, trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, entry } = await requireDiaryEntryAccess(event, id)
  return deleteDiaryEntry(user, entry)
})
