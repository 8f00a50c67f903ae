import { idParams } from '../../../../shared/schemas/common'
import { milestoneAddSchema } from '../../../../shared/schemas/training'

// Adds a milestone to a client's programme at a place after the signed-off ones (the trainer or the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, milestoneAddSchema)
  const row = await addClientMilestone(user, client, input)
  setResponseStatus(event, 201)
  return row
})
