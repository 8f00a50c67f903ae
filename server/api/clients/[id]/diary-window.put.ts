import { idParams } from '../../../../shared/schemas/common'
import { diaryWindowSchema } from '../../../../shared/schemas/diary'

// Sets this client's own warning window, in minutes before onset (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { write: true })
  const input = await readValidatedJson(event, diaryWindowSchema)
  const row = await setDiaryWindow(user, client, input)
  return { clientId: row.clientId, minMinutes: row.minMinutes, maxMinutes: row.maxMinutes, source: 'client' as const }
})
