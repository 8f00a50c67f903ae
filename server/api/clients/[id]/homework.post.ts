import { idParams } from '../../../../shared/schemas/common'
import { assignmentCreateSchema } from '../../../../shared/schemas/homework'

// Sets homework for a household, from an exercise or from scratch (the client's trainer, the office).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { write: true })
  const input = await readValidatedJson(event, assignmentCreateSchema)
  setResponseStatus(event, 201)
  return createHomeworkAssignment(user, client, input)
})
