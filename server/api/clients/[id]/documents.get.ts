import { idParams } from '../../../../shared/schemas/common'

// The documents on a client file: its handlers, its trainer and the admin.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { client } = await requireClientAccess(event, id)
  return { rows: await listClientDocuments(client.id) }
})
