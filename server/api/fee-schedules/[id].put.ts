import { idParams } from '../../../shared/schemas/common'
import { feeScheduleSchema } from '../../../shared/schemas/fee-schedules'

// Sets a programme template's price list and payment plan; `id` is the template's id (the office only).
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const input = await readValidatedJson(event, feeScheduleSchema)
  return saveFeeSchedule(user, id, input)
})
