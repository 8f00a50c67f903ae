import { idParams } from '../../../../shared/schemas/common'

// A client's training log: sessions newest first with trials and scores (the household, the trainer, the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { client } = await requireClientAccess(event, id)
  return { rows: await listTrainingSessions(client) }
})
