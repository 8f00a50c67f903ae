// The periodic check of the sample banks: samples age and the rate window slides even when nobody records anything,
// so each household's stock status is recomputed at least hourly (checkStaleSampleBanks finds the stale ones in one
// indexed query, a batch at a time). A low-stock episode still sends its reminder once (outbox dedupe key).
// SAMPLE_CHECK_INTERVAL_MS sets how often it looks (default 10 minutes); SAMPLE_CHECK=off turns it off on an instance.
import { databaseReady } from './database'

export default defineNitroPlugin((nitro) => {
  if (process.env.SAMPLE_CHECK === 'off') return
  const every = Number(process.env.SAMPLE_CHECK_INTERVAL_MS || 10 * 60 * 1000)
  let busy = false
  const run = async () => {
    if (busy) return
    busy = true
    try {
      await databaseReady()
      while (await checkStaleSampleBanks(50) === 50) { /* the next batch */ }
    }
    catch (err) { logFailure('job.failed', 'The sample stock check failed.', err) }
    finally { busy = false }
  }
  const first = setTimeout(run, 5000)
  const timer = setInterval(run, every)
  first.unref?.()
  timer.unref?.()
  nitro.hooks.hook('close', () => { clearTimeout(first); clearInterval(timer) })
})
