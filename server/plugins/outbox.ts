export default defineNitroPlugin((nitro) => {
  if (process.env.OUTBOX_WORKER === 'off') return
  const every = Number(process.env.OUTBOX_INTERVAL_MS || useRuntimeConfig().outboxIntervalMs || 2000)
  const timer = setInterval(() => {
    void deliverDueEmails().catch(err => logFailure('mail.run-failed', 'An outbox run failed.', err))
  }, every)
  timer.unref?.()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
