// npm run restore -- <backup folder> --yes: puts a backup back in place of DATABASE_URL's file and FILES_DIR.
// Stop the app first. What was there is kept aside (renamed *.before-restore-<time>).
import { resolve } from 'node:path'
import { DEFAULT_DATABASE_URL } from '../server/database/client'
import { restoreBackup } from './lib/backup'

const dir = process.argv.slice(2).find(a => !a.startsWith('--'))
if (!dir || !process.argv.includes('--yes')) {
  console.error('Usage: npm run restore -- <backup folder> --yes\nStop the app first: the database and the files are replaced (the old ones are kept aside).')
  process.exit(1)
}
try {
  const { keptAside } = await restoreBackup({
    backupDir: resolve(dir),
    databaseUrl: process.env.DATABASE_URL || DEFAULT_DATABASE_URL,
    filesDir: process.env.S3_BUCKET ? null : resolve(process.env.FILES_DIR || './data/files'),
  })
  console.log(`Restored ${resolve(dir)}.`)
  for (const k of keptAside) console.log(`  kept aside: ${k}`)
}
catch (err) {
  console.error(`Restore failed: ${(err as Error).message}`)
  process.exit(1)
}
