import { idParams } from '../../../shared/schemas/common'
import { outerBagMoveSchema } from '../../../shared/schemas/samples'

// Moves an outer bag into a freezer container of its kind (or takes it out: containerId null).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, bag } = await requireOuterBagAccess(event, id)
  const { containerId } = await readValidatedJson(event, outerBagMoveSchema)
  return moveOuterBag(user, bag, containerId)
})
