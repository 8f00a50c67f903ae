import { idParams } from '../../../shared/schemas/common'

// One sample with its uses and state, and the outer bags and containers of its kind it may go into.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, sample, client } = await requireSampleAccess(event, id)
  return getSampleDetail(user, sample, client)
})
