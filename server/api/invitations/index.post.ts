import { invitationSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin', 'trainer')
  const input = await readValidatedJson(event, invitationSchema)
  if (input.role === 'trainer' && user.role !== 'admin') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the admin can invite trainers.' })
  }
  if (input.role === 'handler') await requireClientAccess(event, input.clientId, { write: true })
  const { invitation } = await createInvitation(user, input)
  setResponseStatus(event, 201)
  return { id: invitation.id, email: invitation.email, role: invitation.role, clientId: invitation.clientId, expiresAt: invitation.expiresAt }
})
