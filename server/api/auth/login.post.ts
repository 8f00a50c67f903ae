import { loginSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const { email, password } = await readValidatedJson(event, loginSchema)
  const counters = signInCounters(event, email)
  const what = 'Too many failed sign-ins. You can reset your password meanwhile.'
  await assertNotThrottled(event, counters, what)
  const user = await verifyCredentials(email, password)
  if (!user) {
    logEvent('auth.sign-in.failed', { email: email.toLowerCase() }, 'warn', event)
    await countAttempt(event, counters, what)
    // One message for unknown e-mails, wrong passwords and disabled accounts: sign-in reveals nothing.
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'That e-mail and password do not match an active account. Check both, or reset your password.' })
  }
  if (user.totpEnabledAt) {
    // Password right; the sign-in finishes only with the second factor (POST /api/auth/second-factor).
    await askForSecondFactor(event, user)
    return { secondFactor: 'required' as const }
  }
  await finishSignIn(event, user, counters)
  return { user: toAuthUser(user) }
})
