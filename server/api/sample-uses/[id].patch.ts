import { idParams } from '../../../shared/schemas/common'
import { useCloseSchema } from '../../../shared/schemas/samples'

// Closes an open use: the sample went back in the freezer (or was thrown away) at backAt.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, use } = await requireSampleUseAccess(event, id)
  const input = await readValidatedJson(event, useCloseSchema)
  return closeSampleUse(user, use, input)
})
