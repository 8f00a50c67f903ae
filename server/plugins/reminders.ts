// The reminder job (server/services/reminders.ts): every REMINDER_INTERVAL_MS (default 5 minutes) it writes the
// reminders that have fallen due to the outbox, each once (dedupe keys). REMINDERS=off turns it off on an instance.
export default defineNitroPlugin((nitro) => {
  if (process.env.REMINDERS === 'off') return
  const every = Number(process.env.REMINDER_INTERVAL_MS || 5 * 60 * 1000)
  runPeriodically(nitro, 'reminders', every, 3000, async () => {
    const run = await runReminders()
    if (run.appointments + run.homework + run.samples + run.invoices) logEvent('reminders.run', { ...run })
  })
})
