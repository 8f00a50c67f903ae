import { idParams } from '../../../../shared/schemas/common'
import { appointmentCancelSchema } from '../../../../shared/schemas/schedule'

// Cancels one visit, or this and the following visits of its series; the household is told at once.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, appointment, client } = await requireAppointmentAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, appointmentCancelSchema)
  return cancelAppointment(user, appointment, client, input)
})
