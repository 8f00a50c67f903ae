import { idParams } from '../../../shared/schemas/common'

export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, appointment } = await requireAppointmentAccess(event, id)
  return getAppointment(user, appointment.id)
})
