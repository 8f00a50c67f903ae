import { idParams } from '../../../shared/schemas/common'
import { dogUpdateSchema } from '../../../shared/schemas/dogs'

// Edits the dog's details (trainer, admin); the status changes through POST /api/dogs/[id]/status.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog } = await requireDogAccess(event, id, { write: true })
  const input = await readValidatedJson(event, dogUpdateSchema)
  return updateDog(user, dog, input)
})
