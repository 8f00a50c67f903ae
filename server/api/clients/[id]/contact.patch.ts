import { clientContactSchema } from '../../../../shared/schemas/clients'
import { idParams } from '../../../../shared/schemas/common'

// The household's contact details: its handlers may keep them up to date themselves.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const changes = await readValidatedJson(event, clientContactSchema)
  return updateClient(user, client, changes, 'client.contact-updated')
})
