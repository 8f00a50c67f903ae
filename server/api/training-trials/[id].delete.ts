import { idParams } from '../../../shared/schemas/common'

// Undoes a trial (removes it from its session).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, trial } = await requireTrialAccess(event, id)
  return deleteTrial(user, trial)
})
