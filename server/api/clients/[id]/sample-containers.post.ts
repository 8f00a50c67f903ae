import { idParams } from '../../../../shared/schemas/common'
import { containerCreateSchema } from '../../../../shared/schemas/samples'

// Adds a freezer container (a lidded jar or tub) for one kind of sample.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const input = await readValidatedJson(event, containerCreateSchema)
  const container = await createSampleContainer(user, client, input)
  setResponseStatus(event, 201)
  return container
})
