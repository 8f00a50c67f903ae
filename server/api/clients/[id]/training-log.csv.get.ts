import { idParams } from '../../../../shared/schemas/common'

// A client's training log as CSV, one line per trial (the household, the trainer, the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { client } = await requireClientAccess(event, id)
  const csv = await trainingLogCsv(client)
  setHeader(event, 'Content-Type', 'text/csv; charset=utf-8')
  setHeader(event, 'Content-Disposition', `attachment; filename="training-log-${client.id.slice(0, 8)}.csv"`)
  return csv
})
