import { idParams } from '../../../shared/schemas/common'
import { milestoneCriteriaSchema } from '../../../shared/schemas/training'

// The trainer makes a measured milestone's criteria stricter for this client (or back to the defaults with null).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, milestone } = await requireMilestoneAccess(event, id)
  const input = await readValidatedJson(event, milestoneCriteriaSchema)
  return setMilestoneCriteria(user, milestone, input.criteria)
})
