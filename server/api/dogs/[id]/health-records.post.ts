import { idParams } from '../../../../shared/schemas/common'
import { healthRecordSchema } from '../../../../shared/schemas/dogs'

// Adds a vaccination, health clearance, parasite treatment or other record (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog } = await requireDogAccess(event, id, { write: true })
  const input = await readValidatedJson(event, healthRecordSchema)
  const record = await addDogHealthRecord(user, dog, input)
  setResponseStatus(event, 201)
  return record
})
