import { eq } from 'drizzle-orm'
import { z } from 'zod'

export default defineEventHandler(async (event) => {
  const { token } = getValidatedParams(event, z.object({ token: z.string().min(20).max(200) }))
  const invitation = await findOpenInvitation(token)
  if (!invitation) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'This invitation link has expired or was already used. Ask your trainer or the office for a new one.' })
  // Only the holder of the e-mailed link learns whether that address already has an account.
  const [existing] = await useDb().select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, invitation.email)).limit(1)
  return { email: invitation.email, name: invitation.name, role: invitation.role, expiresAt: invitation.expiresAt, hasAccount: !!existing }
})
