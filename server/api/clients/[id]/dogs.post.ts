import { idParams } from '../../../../shared/schemas/common'
import { dogCreateSchema } from '../../../../shared/schemas/dogs'

// Adds a dog to a client file (the trainer of the client, or the admin); its history starts with 'assessment'.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { write: true })
  const input = await readValidatedJson(event, dogCreateSchema)
  const dog = await createDog(user, client, input)
  setResponseStatus(event, 201)
  return dog
})
