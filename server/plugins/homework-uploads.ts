// The periodic cleanup of homework uploads: an upload that gets no bytes for the policy's hours (default 24) is
// removed with its staged file, and staged files without an upload row (left by a crash) go too. Nothing half-
// uploaded is ever a video, so this only frees disk. UPLOAD_CLEANUP_INTERVAL_MS sets how often it looks (default
// 15 minutes); UPLOAD_CLEANUP=off turns it off on an instance (e.g. all but one instance sharing a staging folder).
import { databaseReady } from './database'

export default defineNitroPlugin((nitro) => {
  if (process.env.UPLOAD_CLEANUP === 'off') return
  const every = Number(process.env.UPLOAD_CLEANUP_INTERVAL_MS || 15 * 60 * 1000)
  let busy = false
  const run = async () => {
    if (busy) return
    busy = true
    try {
      await databaseReady()
      const removed = await cleanUpHomeworkUploads()
      if (removed) logEvent('job.homework-upload-cleanup', { removed })
    }
    catch (err) { logFailure('job.failed', 'The homework upload cleanup failed.', err) }
    finally { busy = false }
  }
  const first = setTimeout(run, Math.min(every, 5000))
  const timer = setInterval(run, every)
  first.unref?.()
  timer.unref?.()
  nitro.hooks.hook('close', () => { clearTimeout(first); clearInterval(timer) })
})
