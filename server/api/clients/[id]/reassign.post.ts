import { reassignSchema } from '../../../../shared/schemas/clients'
import { idParams } from '../../../../shared/schemas/common'

export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { write: true })
  const { trainerId, note } = await readValidatedJson(event, reassignSchema)
  return reassignClient(user, client, trainerId, note)
})
