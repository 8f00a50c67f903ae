import { appointmentCreateSchema } from '../../../shared/schemas/schedule'

// Books a visit or a weekly series for a client (the trainer or the office). An overlap with the trainer's other
// visits is reported in `conflicts`, never refused.
export default defineEventHandler(async (event) => {
  requireRole(event, 'trainer', 'admin')
  const input = await readValidatedJson(event, appointmentCreateSchema)
  const { user, client } = await requireClientAccess(event, input.clientId, { write: true })
  const result = await createAppointment(user, client, input)
  setResponseStatus(event, 201)
  return result
})
