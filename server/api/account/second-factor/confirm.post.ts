import { secondFactorCodeSchema } from '../../../../shared/schemas/auth'

// Finishes the set-up with the first code from the app; answers the recovery codes, shown this once only.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const { code } = await readValidatedJson(event, secondFactorCodeSchema)
  const recoveryCodes = await confirmSecondFactorEnrolment(user, code)
  return { enabled: true, recoveryCodes }
})
