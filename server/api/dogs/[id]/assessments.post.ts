import { idParams } from '../../../../shared/schemas/common'
import { assessmentSchema } from '../../../../shared/schemas/dogs'

// Records a suitability assessment: a 1-5 score per trait, notes and the outcome (trainer, admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog } = await requireDogAccess(event, id, { write: true })
  const input = await readValidatedJson(event, assessmentSchema)
  const assessment = await addDogAssessment(user, dog, input)
  setResponseStatus(event, 201)
  return assessment
})
