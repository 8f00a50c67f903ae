import { idParams } from '../../../../shared/schemas/common'
import { sessionCreateSchema } from '../../../../shared/schemas/training'

// Logs a session (a handler's homework, or the trainer's), optionally with its trials at once.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const input = await readValidatedJson(event, sessionCreateSchema)
  const session = await createTrainingSession(user, client, input)
  setResponseStatus(event, 201)
  return session
})
