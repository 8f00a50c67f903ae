// A periodic job of this instance: `name` for the logs, every `everyMs` (first run after `firstAfterMs`), never two
// runs at once, a failure logged with the job's name and retried next period. Stopped when the server closes.
import type { NitroApp } from 'nitropack/types'
import { databaseReady } from '../plugins/database'

export function runPeriodically(nitro: NitroApp, name: string, everyMs: number, firstAfterMs: number, job: () => Promise<void>) {
  let busy = false
  const run = async () => {
    if (busy) return
    busy = true
    try {
      await databaseReady()
      await job()
    }
    catch (err) { logEvent('job.failed', { job: name, err: String((err as Error)?.message ?? err) }, 'error') }
    finally { busy = false }
  }
  const first = setTimeout(run, Math.min(everyMs, firstAfterMs))
  const timer = setInterval(run, everyMs)
  first.unref?.()
  timer.unref?.()
  nitro.hooks.hook('close', () => { clearTimeout(first); clearInterval(timer) })
}
