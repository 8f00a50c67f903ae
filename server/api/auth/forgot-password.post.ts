import { forgotPasswordSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const { email } = await readValidatedJson(event, forgotPasswordSchema)
  await countAttempt(event, [['resetEmail', email.toLowerCase()], ['resetAddress', requestAddress(event)]], 'Too many reset requests.')
  await requestPasswordReset(email)
  // The same answer whether or not the e-mail has an account.
  return { message: 'If that e-mail has an account, a reset link is on its way. It works for one hour.' }
})
