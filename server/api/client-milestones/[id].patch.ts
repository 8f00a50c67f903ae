import { idParams } from '../../../shared/schemas/common'
import { milestoneUpdateSchema } from '../../../shared/schemas/training'

// The trainer (own clients) or the admin renames a milestone not yet signed off, edits its text for the handler, or
// makes a measured milestone's criteria stricter for this client (null: back to the defaults).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, milestone } = await requireMilestoneAccess(event, id)
  const input = await readValidatedJson(event, milestoneUpdateSchema)
  return updateMilestone(user, milestone, input)
})
