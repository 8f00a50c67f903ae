import { idParams } from '../../../../shared/schemas/common'
import { assignmentCancelSchema } from '../../../../shared/schemas/homework'

// Cancels open homework (trainer, admin); its videos stay on file.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, assignment, client } = await requireHomeworkAssignmentAccess(event, id, { staff: true })
  const { reason } = await readValidatedJson(event, assignmentCancelSchema)
  return cancelHomeworkAssignment(user, assignment, client, reason)
})
