import { z } from 'zod'

export default defineEventHandler(async (event) => {
  const { token } = getValidatedParams(event, z.object({ token: z.string().min(20).max(200) }))
  const invitation = await findOpenInvitation(token)
  if (!invitation) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'This invitation link has expired or was already used. Ask your trainer or the office for a new one.' })
  return { email: invitation.email, name: invitation.name, role: invitation.role, expiresAt: invitation.expiresAt }
})
