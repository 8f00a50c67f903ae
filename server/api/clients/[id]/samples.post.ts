import { idParams } from '../../../../shared/schemas/common'
import { sampleCreateSchema } from '../../../../shared/schemas/samples'

// Records a collection (the handler of the household, its trainer or the admin); without answers it is a quick save.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const input = await readValidatedJson(event, sampleCreateSchema)
  const sample = await createSample(user, client, input)
  setResponseStatus(event, 201)
  return sample
})
