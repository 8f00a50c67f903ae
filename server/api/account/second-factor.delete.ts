import { secondFactorOffSchema } from '../../../shared/schemas/auth'

// Turns the second factor off (with the password), unless the office requires one for staff.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const { password } = await readValidatedJson(event, secondFactorOffSchema)
  await turnOffSecondFactor(user, password)
  return secondFactorStatus(user)
})
