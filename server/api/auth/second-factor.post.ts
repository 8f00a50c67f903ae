import { eq } from 'drizzle-orm'
import { secondFactorSignInSchema } from '../../../shared/schemas/auth'

// The second step of a sign-in: the code from the authenticator app (or a recovery code) after a right password.
export default defineEventHandler(async (event) => {
  const input = await readValidatedJson(event, secondFactorSignInSchema)
  const session = await getUserSession(event)
  const pending = session.pendingSecondFactor
  const [user] = pending && pending.until > Date.now()
    ? await useDb().select().from(schema.users).where(eq(schema.users.id, pending.userId)).limit(1)
    : []
  if (!pending || !user || user.disabledAt || user.sessionVersion !== pending.sv || !user.totpEnabledAt) {
    // A stale step is forgotten; a signed-in session (no step pending) is left alone.
    if (pending) await clearUserSession(event)
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'Your sign-in timed out. Enter your e-mail and password again.' })
  }
  const counters = signInCounters(event, user.email)
  const what = 'Too many wrong codes. Please wait before trying again.'
  await assertNotThrottled(event, counters, what)
  if (!await verifySecondFactor(user.id, input)) {
    logEvent('auth.second-factor.failed', { userId: user.id, kind: 'code' in input ? 'code' : 'recovery-code' }, 'warn', event)
    await countAttempt(event, counters, what)
    throw createError({
      statusCode: 422, statusMessage: 'Unprocessable Content',
      message: 'That code does not match (or was already used). Enter the code shown now in your authenticator app.',
      data: { fieldErrors: { ['code' in input ? 'code' : 'recoveryCode']: 'That code does not match, or was already used.' } },
    })
  }
  if ('recoveryCode' in input) logEvent('auth.recovery-code.used', { userId: user.id }, 'warn', event)
  await finishSignIn(event, user, counters)
  return { user: toAuthUser(user) }
})
