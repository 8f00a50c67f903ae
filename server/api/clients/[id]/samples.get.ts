import { idParams } from '../../../../shared/schemas/common'

// A household's sample bank: stock by kind, age and uses left, the forecast and the reminder status.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  return getSampleBank(user, client)
})
