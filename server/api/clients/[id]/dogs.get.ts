import { idParams } from '../../../../shared/schemas/common'

// A client's dogs with age and health flags (the household's handlers, the trainer, the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  return listClientDogs(user, client.id)
})
