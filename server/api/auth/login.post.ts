import { eq } from 'drizzle-orm'
import { loginSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const { email, password } = await readValidatedJson(event, loginSchema)
  const checks: Array<[ThrottleName, string]> = [['signInEmail', email.toLowerCase()], ['signInAddress', requestAddress(event)]]
  const what = 'Too many failed sign-ins.'
  await assertNotThrottled(event, checks, `${what} You can reset your password meanwhile.`)
  const user = await verifyCredentials(email, password)
  if (!user) await countAttempt(event, checks, `${what} You can reset your password meanwhile.`)
  // One message for unknown e-mails, wrong passwords and disabled accounts: sign-in reveals nothing.
  if (!user) throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'That e-mail and password do not match an active account. Check both, or reset your password.' })
  await useDb().transaction(async (tx) => {
    await tx.update(schema.users).set({ lastSignInAt: new Date() }).where(eq(schema.users.id, user.id))
    await logAudit(tx, { actorId: user.id, action: 'signed-in', entityType: 'user', entityId: user.id })
  })
  await clearAttempts('signInEmail', email.toLowerCase())
  await startSession(event, user)
  return { user: toAuthUser(user) }
})
