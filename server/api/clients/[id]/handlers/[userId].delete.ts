import { z } from 'zod'
import { id } from '../../../../../shared/schemas/common'

export default defineEventHandler(async (event) => {
  const params = getValidatedParams(event, z.object({ id, userId: id }))
  const { user } = await requireClientAccess(event, params.id, { write: true })
  return removeHandler(user, params.id, params.userId)
})
