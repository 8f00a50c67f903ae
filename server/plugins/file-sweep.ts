// The periodic orphan-file sweep (server/services/file-sweep.ts). FILE_SWEEP_INTERVAL_MS sets how often (default
// 1 hour); FILE_SWEEP=off turns it off on an instance (one instance is enough when several share the storage).
export default defineNitroPlugin((nitro) => {
  if (process.env.FILE_SWEEP === 'off') return
  runPeriodically(nitro, 'file-sweep', Number(process.env.FILE_SWEEP_INTERVAL_MS || 60 * 60 * 1000), 10_000, async () => {
    const result = await sweepOrphanFiles()
    if (result.orphans || result.temporary) logEvent('job.file-sweep', { ...result })
  })
})
