import { idParams } from '../../../../shared/schemas/common'
import { homeworkNoteSchema } from '../../../../shared/schemas/homework-notes'

// A note about one practice of this homework (the household, its trainer, the office), often sent late from a phone
// that had no signal: the practice time is the moment of the tap unless given.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, assignment } = await requireHomeworkAssignmentAccess(event, id)
  const input = await readValidatedJson(event, homeworkNoteSchema)
  setResponseStatus(event, 201)
  return addHomeworkNote(user, assignment, input, (event.context.tappedAt as Date | null | undefined) ?? null)
})
