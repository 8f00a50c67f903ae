// Every programme template with its fee schedule (the office only).
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  return listFeeSchedules()
})
