import { idParams } from '../../../shared/schemas/common'
import { appointmentUpdateSchema } from '../../../shared/schemas/schedule'

// Moves or changes one visit, or this and the following visits of its series (scope: 'one' | 'following').
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, appointment, client } = await requireAppointmentAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, appointmentUpdateSchema)
  return updateAppointment(user, appointment, client, input)
})
