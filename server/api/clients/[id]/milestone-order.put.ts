import { idParams } from '../../../../shared/schemas/common'
import { milestoneOrderSchema } from '../../../../shared/schemas/training'

// Puts the milestones not yet signed off in a new order; the signed-off ones stay first (the trainer or the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, milestoneOrderSchema)
  return reorderClientMilestones(user, client, input.ids)
})
