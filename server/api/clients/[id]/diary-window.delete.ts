import { idParams } from '../../../../shared/schemas/common'

// Returns this client to the business policy's window for their condition (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { write: true })
  return clearDiaryWindow(user, client)
})
