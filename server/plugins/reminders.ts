// The reminder job (server/services/reminders.ts): every REMINDER_INTERVAL_MS (default 5 minutes) it writes the
// reminders that have fallen due to the outbox, each once (dedupe keys). REMINDERS=off turns it off on an instance.
import { databaseReady } from './database'

export default defineNitroPlugin((nitro) => {
  if (process.env.REMINDERS === 'off') return
  const every = Number(process.env.REMINDER_INTERVAL_MS || 5 * 60 * 1000)
  let busy = false
  const run = async () => {
    if (busy) return
    busy = true
    try {
      await databaseReady()
      await runReminders()
    }
    catch (err) { console.error('[reminders] run failed:', err) }
    finally { busy = false }
  }
  const first = setTimeout(run, 3000)
  const timer = setInterval(run, every)
  first.unref?.()
  timer.unref?.()
  nitro.hooks.hook('close', () => { clearTimeout(first); clearInterval(timer) })
})
