import { idParams } from '../../../shared/schemas/common'

// Removes a milestone from a client's programme: only one not yet signed off with no homework set for it.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, milestone } = await requireMilestoneAccess(event, id)
  return removeClientMilestone(user, milestone)
})
