import { migrateDatabase, prepareDatabase } from '../database/client'

let ready: Promise<void> | undefined

/** Resolves once the database is prepared and migrated; every request waits on it (instantly after start-up). */
export function databaseReady(): Promise<void> {
  ready ??= (async () => {
    await prepareDatabase(useDbClient(), databaseUrl())
    await migrateDatabase(useDb())
  })()
  return ready
}

export default defineNitroPlugin(() => {
  databaseReady().catch((err) => {
    logFailure('database.start-failed', 'Could not prepare or migrate the database.', err)
    process.exitCode = 1
  })
})
