import { idParams } from '../../../../shared/schemas/common'
import { overrideSchema } from '../../../../shared/schemas/samples'

// The trainer (or admin) allows a compromised sample in training, giving a reason.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, sample } = await requireSampleAccess(event, id)
  if (user.role === 'handler') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer can allow a compromised sample.' })
  const { reason } = await readValidatedJson(event, overrideSchema)
  return overrideSample(user, sample, reason)
})
