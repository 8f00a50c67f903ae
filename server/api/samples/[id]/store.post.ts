import { idParams } from '../../../../shared/schemas/common'
import { sampleStoreSchema } from '../../../../shared/schemas/samples'

// Puts the small bag into an outer bag of its kind (an existing one, or a new one in a container of its kind).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, sample } = await requireSampleAccess(event, id)
  const input = await readValidatedJson(event, sampleStoreSchema)
  return storeSample(user, sample, input)
})
