import { idParams } from '../../../../shared/schemas/common'
import { sampleSettingsSchema } from '../../../../shared/schemas/samples'

// The trainer's choice for one household: keep flagged targets (late in the episode, or after medication) out of
// training (trainer, admin; the household's handlers 403).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { write: true })
  const input = await readValidatedJson(event, sampleSettingsSchema)
  return setSampleSettings(user, client, input)
})
