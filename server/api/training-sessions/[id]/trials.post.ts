import { idParams } from '../../../../shared/schemas/common'
import { trialSchema } from '../../../../shared/schemas/training'

// Adds one trial to a session: one tap per outcome on the training ground. A trial sent again with the same
// entryKey (retry queue, reload) answers 200 with the row already stored; a new one 201.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, session } = await requireTrainingSessionAccess(event, id)
  const input = await readValidatedJson(event, trialSchema)
  const { trial, created } = await addTrial(user, session, input)
  setResponseStatus(event, created ? 201 : 200)
  return trial
})
