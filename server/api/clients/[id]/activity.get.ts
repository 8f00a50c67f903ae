import { activityQuery } from '../../../../shared/schemas/clients'
import { idParams } from '../../../../shared/schemas/common'

export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  await requireClientAccess(event, id, { staff: true })
  const query = getValidatedQueryParams(event, activityQuery)
  return clientActivity(id, query)
})
