import { idParams } from '../../../../shared/schemas/common'
import { discardSchema } from '../../../../shared/schemas/samples'

// Throws a sample away (it stays on record with the reason).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, sample } = await requireSampleAccess(event, id)
  const { reason } = await readValidatedJson(event, discardSchema)
  return discardSample(user, sample, reason)
})
