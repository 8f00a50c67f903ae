import { resetPasswordSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const { token, password } = await readValidatedJson(event, resetPasswordSchema)
  const user = await resetPassword(token, password)
  await startSession(event, user)
  return { user: toAuthUser(user) }
})
