// The office runs the reminder job now (it also runs every few minutes); every reminder still goes out once.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const run = await runReminders()
  await useDb().transaction(tx => logAudit(tx, { actorId: user.id, action: 'reminders.run', entityType: 'job', data: { ...run } }))
  return run
})
