import { idParams } from '../../../../shared/schemas/common'

// The admin clears a person's second factor (lost phone and recovery codes); they set it up again after signing in.
export default defineEventHandler(async (event) => {
  const admin = requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  return resetSecondFactorOf(admin, id)
})
