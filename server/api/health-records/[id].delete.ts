import { idParams } from '../../../shared/schemas/common'

// Deletes a health record entered by mistake (trainer, admin); answers with the record as it was.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog, record } = await requireHealthRecordAccess(event, id, { write: true })
  return deleteDogHealthRecord(user, dog, record)
})
