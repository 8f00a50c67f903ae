import { idParams } from '../../../shared/schemas/common'

// One session with its trials and score (the household, the trainer, the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { session } = await requireTrainingSessionAccess(event, id)
  return getTrainingSession(session)
})
