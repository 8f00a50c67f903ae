// Backups while the app runs: a consistent copy of the SQLite database (VACUUM INTO: one read transaction, so the
// copy is the database as of one moment, whatever is being written meanwhile; SQLite documentation, "VACUUM INTO"),
// checked with PRAGMA integrity_check, together with the file storage (FILES_DIR) copied after it. Restore brings a
// copy back into place with the app stopped. Used by `npm run backup` and `npm run restore` (README "Backups").
import { createHash } from 'node:crypto'
import { chmodSync, cpSync, existsSync, mkdirSync, readFileSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs'
import { basename, dirname, join, resolve } from 'node:path'
import { createClient } from '@libsql/client'

export interface BackupManifest {
  createdAt: string
  database: { file: string, bytes: number, sha256: string, integrity: string }
  files: { copied: number, bytes: number, missing: string[] } | { skipped: string }
}

export const BACKUP_DB_NAME = 'forescent.db'
export const MANIFEST_NAME = 'manifest.json'

function filePathOf(url: string): string {
  if (!url.startsWith('file:')) throw new Error(`Backups copy an SQLite file; ${url.split(':')[0]} databases are backed up by their server (docs/deploy.md).`)
  return resolve(url.slice('file:'.length).split('?')[0]!)
}

function sha256Of(path: string): string {
  return createHash('sha256').update(readFileSync(path)).digest('hex')
}

/** PRAGMA integrity_check of an SQLite file: "ok", or the problems found. */
export async function integrityOf(path: string): Promise<string> {
  const client = createClient({ url: `file:${path}` })
  try {
    const rows = (await client.execute('PRAGMA integrity_check')).rows
    return rows.map(r => String(Object.values(r)[0])).join('; ')
  }
  finally { client.close() }
}

function walkFiles(dir: string): string[] {
  if (!existsSync(dir)) return []
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter(e => e.isFile() && !e.name.startsWith('.'))
    .map(e => join(e.parentPath, e.name))
}

/** The storage keys the database points to (documents, dog photos, homework videos). */
async function referencedKeys(dbPath: string): Promise<string[]> {
  const client = createClient({ url: `file:${dbPath}` })
  try {
    const keys: string[] = []
    for (const table of ['documents', 'dog_photos', 'homework_videos']) {
      const rows = await client.execute(`SELECT storage_key AS k FROM ${table}`).catch(() => ({ rows: [] as Array<Record<string, unknown>> }))
      keys.push(...rows.rows.map(r => String(r.k)))
    }
    return keys
  }
  finally { client.close() }
}

/**
 * Writes a backup folder `<into>/forescent-<UTC time>` (owner-only permissions) holding the database copy, the
 * files, and a manifest; throws when the copy fails its integrity check.
 */
export async function createBackup(opts: { databaseUrl: string, filesDir: string | null, into: string, now?: Date }): Promise<{ dir: string, manifest: BackupManifest }> {
  const source = filePathOf(opts.databaseUrl)
  if (!existsSync(source)) throw new Error(`No database at ${source}.`)
  const stamp = (opts.now ?? new Date()).toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z')
  const dir = resolve(opts.into, `forescent-${stamp}`)
  if (existsSync(dir)) throw new Error(`${dir} exists already.`)
  mkdirSync(dir, { recursive: true, mode: 0o700 })
  chmodSync(dir, 0o700)
  const target = join(dir, BACKUP_DB_NAME)
  const client = createClient({ url: `file:${source}`, timeout: 5000 })
  try {
    await client.execute({ sql: 'VACUUM INTO ?', args: [target] })
  }
  finally { client.close() }
  chmodSync(target, 0o600)
  const integrity = await integrityOf(target)
  if (integrity !== 'ok') throw new Error(`The copy failed its integrity check: ${integrity}`)
  let files: BackupManifest['files']
  if (!opts.filesDir) files = { skipped: 'Files are kept in an S3 bucket: back them up with the bucket\'s versioning or replication.' }
  else {
    // Files are never changed in place (a new version gets a new key), so copying after the snapshot is enough;
    // a file the copy points to but that was removed meanwhile is listed as missing.
    const copyTo = join(dir, 'files')
    let copied = 0
    let bytes = 0
    for (const f of walkFiles(opts.filesDir)) {
      const rel = f.slice(resolve(opts.filesDir).length + 1)
      const to = join(copyTo, rel)
      mkdirSync(dirname(to), { recursive: true, mode: 0o700 })
      try { cpSync(f, to); chmodSync(to, 0o600) }
      catch { continue }
      copied++
      bytes += statSync(to).size
    }
    const missing = (await referencedKeys(target)).filter(k => !existsSync(join(copyTo, ...k.split('/'))))
    files = { copied, bytes, missing }
  }
  const manifest: BackupManifest = {
    createdAt: (opts.now ?? new Date()).toISOString(),
    database: { file: BACKUP_DB_NAME, bytes: statSync(target).size, sha256: sha256Of(target), integrity },
    files,
  }
  writeFileSync(join(dir, MANIFEST_NAME), `${JSON.stringify(manifest, null, 2)}\n`, { mode: 0o600 })
  return { dir, manifest }
}

/**
 * Puts a backup back: checks it (manifest, checksum, integrity), then replaces the database file (its -wal and -shm
 * too) and the files folder. The app must be stopped. What was there before is kept beside it, renamed
 * "*.before-restore-<time>", until you remove it.
 */
export async function restoreBackup(opts: { backupDir: string, databaseUrl: string, filesDir: string | null, now?: Date }): Promise<{ keptAside: string[] }> {
  const manifest = JSON.parse(readFileSync(join(opts.backupDir, MANIFEST_NAME), 'utf8')) as BackupManifest
  const copy = join(opts.backupDir, manifest.database.file)
  if (sha256Of(copy) !== manifest.database.sha256) throw new Error('The backup\'s database does not match its manifest (changed or damaged).')
  const integrity = await integrityOf(copy)
  if (integrity !== 'ok') throw new Error(`The backup's database fails its integrity check: ${integrity}`)
  const target = filePathOf(opts.databaseUrl)
  const suffix = `.before-restore-${(opts.now ?? new Date()).toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z')}`
  const keptAside: string[] = []
  mkdirSync(dirname(target), { recursive: true, mode: 0o700 })
  for (const f of [target, `${target}-wal`, `${target}-shm`]) {
    if (existsSync(f)) { renameSync(f, f + suffix); keptAside.push(f + suffix) }
  }
  const tmp = join(dirname(target), `.${basename(target)}.restoring`)
  cpSync(copy, tmp)
  chmodSync(tmp, 0o600)
  renameSync(tmp, target)
  const files = join(opts.backupDir, 'files')
  if (opts.filesDir && existsSync(files)) {
    const dest = resolve(opts.filesDir)
    if (existsSync(dest)) { renameSync(dest, dest + suffix); keptAside.push(dest + suffix) }
    cpSync(files, dest, { recursive: true })
  }
  return { keptAside }
}

/** Removes backups older than the newest `keep` in a folder (for a schedule). */
export function pruneBackups(into: string, keep: number): string[] {
  if (!existsSync(into)) return []
  const all = readdirSync(into).filter(n => /^forescent-\d{8}T\d{6}Z$/.test(n)).sort()
  const gone = all.slice(0, Math.max(0, all.length - keep))
  for (const n of gone) rmSync(join(into, n), { recursive: true, force: true })
  return gone
}
