import { idParams } from '../../../../shared/schemas/common'

// A client's alert diary: entries with what each matched, the period summary and the lead times by month
// (the household's handlers, the trainer, the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  return getClientDiary(user, client)
})
