// npm run backup [-- --into <folder>] [--keep <n>]: a consistent copy of the database and the files while the app
// runs (scripts/lib/backup.ts). Default folder BACKUP_DIR or ./data/backups; --keep removes all but the newest n.
import { resolve } from 'node:path'
import { DEFAULT_DATABASE_URL } from '../server/database/client'
import { createBackup, pruneBackups } from './lib/backup'

const arg = (name: string) => { const i = process.argv.indexOf(`--${name}`); return i > 0 ? process.argv[i + 1] : undefined }
const into = resolve(arg('into') || process.env.BACKUP_DIR || './data/backups')
const keep = arg('keep') ? Number(arg('keep')) : undefined
try {
  const { dir, manifest } = await createBackup({
    databaseUrl: process.env.DATABASE_URL || DEFAULT_DATABASE_URL,
    filesDir: process.env.S3_BUCKET ? null : resolve(process.env.FILES_DIR || './data/files'),
    into,
  })
  console.log(`Backup written to ${dir}`)
  console.log(`  database: ${manifest.database.bytes} bytes, integrity ${manifest.database.integrity}`)
  if ('copied' in manifest.files) {
    console.log(`  files: ${manifest.files.copied} (${manifest.files.bytes} bytes)`)
    if (manifest.files.missing.length) console.log(`  note: ${manifest.files.missing.length} file(s) were removed while the backup ran and are not in it`)
  }
  else console.log(`  files: ${manifest.files.skipped}`)
  if (keep && keep > 0) for (const gone of pruneBackups(into, keep)) console.log(`  removed the older backup ${gone}`)
}
catch (err) {
  console.error(`Backup failed: ${(err as Error).message}`)
  process.exit(1)
}
