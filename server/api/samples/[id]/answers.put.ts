import { idParams } from '../../../../shared/schemas/common'
import { sampleAnswersSchema } from '../../../../shared/schemas/samples'

// Completes (or corrects, before first use) the collection checklist; a broken rule marks the sample compromised.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, sample } = await requireSampleAccess(event, id)
  const input = await readValidatedJson(event, sampleAnswersSchema)
  return completeSampleAnswers(user, sample, input)
})
