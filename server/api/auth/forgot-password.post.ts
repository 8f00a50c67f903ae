import { forgotPasswordSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const { email } = await readValidatedJson(event, forgotPasswordSchema)
  await countAttempt(event, [['resetEmail', email.toLowerCase()], ['resetAddress', requestAddress(event)]], 'Too many reset requests.')
  // The same answer, after the same work, whether or not the e-mail has an account: the lookup and the queued e-mail
  // happen after answering, so neither the answer nor its timing tells who has an account.
  const work = requestPasswordReset(email)
    .then(queued => logEvent('auth.reset.requested', { queued }, 'info', event))
    .catch(err => logEvent('auth.reset.failed', { err: String((err as Error)?.message ?? err) }, 'error', event))
  event.waitUntil(work)
  return { message: 'If that e-mail has an account, a reset link is on its way. It works for one hour.' }
})
