import { eq, sql } from 'drizzle-orm'
import { changePasswordSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const me = requireUser(event)
  const { currentPassword, newPassword } = await readValidatedJson(event, changePasswordSchema)
  const ok = await verifyCredentials(me.email, currentPassword)
  if (!ok) throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'Your current password is not right.', data: { fieldErrors: { currentPassword: 'Your current password is not right.' } } })
  const passwordHash = await hashPassword(newPassword)
  const user = await useDb().transaction(async (tx) => {
    const [u] = await tx.update(schema.users).set({ passwordHash, sessionVersion: sql`${schema.users.sessionVersion} + 1` }).where(eq(schema.users.id, me.id)).returning()
    await logAudit(tx, { actorId: me.id, action: 'password.changed', entityType: 'user', entityId: me.id })
    return u!
  })
  // Every other device is signed out; this one continues with a fresh session.
  await startSession(event, user)
  return { user: toAuthUser(user) }
})
