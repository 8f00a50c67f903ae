import { idParams } from '../../../../shared/schemas/common'
import { milestoneConfirmSchema } from '../../../../shared/schemas/training'

// The trainer signs a milestone off (a written reason when criteria are unmet); the household is e-mailed.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, milestone, client } = await requireMilestoneAccess(event, id)
  const input = await readValidatedJson(event, milestoneConfirmSchema)
  return confirmMilestone(user, milestone, client, input.reason)
})
