import { appointmentCreateSchema } from '../../../shared/schemas/schedule'

// What a booking would create (every visit's start and end) and which of the trainer's visits it would overlap;
// nothing is written.
export default defineEventHandler(async (event) => {
  requireRole(event, 'trainer', 'admin')
  const input = await readValidatedJson(event, appointmentCreateSchema)
  const { client } = await requireClientAccess(event, input.clientId, { write: true })
  return previewAppointment(client, input)
})
