// The periodic invoice work: issue plan instalments on their day and queue overdue reminders once per policy interval
// (runInvoiceSchedule in server/services/invoice-plans.ts; each reminder has an outbox dedupe key per invoice and
// interval, and the invoice's reminder count is updated under a guard, so several instances never send one twice).
// INVOICE_SCHEDULE_INTERVAL_MS sets how often (default 1 hour); INVOICE_SCHEDULE=off turns it off on an instance.
import { databaseReady } from './database'

export default defineNitroPlugin((nitro) => {
  if (process.env.INVOICE_SCHEDULE === 'off') return
  const every = Number(process.env.INVOICE_SCHEDULE_INTERVAL_MS || 60 * 60 * 1000)
  const run = async () => {
    try {
      await databaseReady()
      await runInvoiceSchedule()
    }
    catch (err) { logFailure('job.failed', 'The invoice schedule run failed.', err) }
  }
  const first = setTimeout(run, 7000)
  const timer = setInterval(run, every)
  first.unref?.()
  timer.unref?.()
  nitro.hooks.hook('close', () => { clearTimeout(first); clearInterval(timer) })
})
