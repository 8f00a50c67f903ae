import { idParams } from '../../../shared/schemas/common'

export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  return getClientFile(user, client)
})
