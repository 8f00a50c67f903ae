import { idParams } from '../../../shared/schemas/common'
import { assignmentUpdateSchema } from '../../../shared/schemas/homework'

// Changes open homework: title, instructions, milestone, due date, videos expected (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, assignment, client } = await requireHomeworkAssignmentAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, assignmentUpdateSchema)
  return updateHomeworkAssignment(user, assignment, client, input)
})
