import { clientUpdateSchema } from '../../../shared/schemas/clients'
import { idParams } from '../../../shared/schemas/common'

export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { write: true })
  const changes = await readValidatedJson(event, clientUpdateSchema)
  return updateClient(user, client, changes)
})
