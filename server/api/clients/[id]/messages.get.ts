import { z } from 'zod'
import { idParams } from '../../../../shared/schemas/common'

const query = z.object({ before: z.coerce.date().optional(), limit: z.coerce.number().int().min(1).max(200).optional() })

// The household's conversation, oldest first (the latest 100, or those before a time).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const q = getValidatedQueryParams(event, query)
  return listMessages(user, client, q)
})
