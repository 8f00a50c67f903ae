import { idParams } from '../../../../shared/schemas/common'

// A household's homework: open assignments first (soonest due), each with its videos, review state and comments.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  return listClientHomework(user, client)
})
