// "Send due reminders now": the same run as the periodic job — issue plan instalments whose day has come and queue
// the overdue reminders of the current interval (each once). The office only.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const result = await runInvoiceSchedule()
  await logAudit(useDb(), { actorId: user.id, action: 'invoice.schedule-run', entityType: 'invoice', data: { name: 'Invoice schedule run by hand', ...result } })
  return result
})
