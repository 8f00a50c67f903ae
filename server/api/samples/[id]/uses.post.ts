import { idParams } from '../../../../shared/schemas/common'
import { useCreateSchema } from '../../../../shared/schemas/samples'

// Records a sample coming out of the freezer for training (open), or a whole use (with the time it went back).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, sample } = await requireSampleAccess(event, id)
  const input = await readValidatedJson(event, useCreateSchema)
  const result = await recordSampleUse(user, sample, input)
  setResponseStatus(event, 201)
  return result
})
