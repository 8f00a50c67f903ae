import { idParams } from '../../../../shared/schemas/common'
import { dogStatusChangeSchema } from '../../../../shared/schemas/dogs'

// Records a status change with its date (trainer, admin): never in the future, never before the latest change.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog } = await requireDogAccess(event, id, { write: true })
  const input = await readValidatedJson(event, dogStatusChangeSchema)
  const result = await recordDogStatus(user, dog, input)
  setResponseStatus(event, 201)
  return result
})
