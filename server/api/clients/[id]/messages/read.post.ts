import { idParams } from '../../../../../shared/schemas/common'

// Marks the conversation read up to now for the signed-in person.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  await markConversationRead(user, client.id)
  return { clientId: client.id, readAt: new Date() }
})
