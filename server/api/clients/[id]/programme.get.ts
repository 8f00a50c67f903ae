import { idParams } from '../../../../shared/schemas/common'

// A client's programme: milestones, the current one, and readiness figures (the household, the trainer, the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  return getClientProgramme(user, client)
})
