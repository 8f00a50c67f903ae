import { idParams } from '../../../../shared/schemas/common'
import { trialSchema } from '../../../../shared/schemas/training'

// Adds one trial to a session: one tap per outcome on the training ground.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, session } = await requireTrainingSessionAccess(event, id)
  const input = await readValidatedJson(event, trialSchema)
  const trial = await addTrial(user, session, input)
  setResponseStatus(event, 201)
  return trial
})
