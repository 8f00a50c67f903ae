import { idParams } from '../../../shared/schemas/common'
import { healthRecordUpdateSchema } from '../../../shared/schemas/dogs'

// Corrects a health record (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog, record } = await requireHealthRecordAccess(event, id, { write: true })
  const input = await readValidatedJson(event, healthRecordUpdateSchema)
  return updateDogHealthRecord(user, dog, record, input)
})
