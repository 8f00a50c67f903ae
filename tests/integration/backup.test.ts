// npm run backup / restore (issue 13): a backup taken while the app is busy writing is one consistent moment of the
// database (every row there or not, never half a transaction), passes PRAGMA integrity_check, carries the files,
// and restores to a working copy (OWASP ASVS 4.0 V8.1.5, V8.1.6; SQLite documentation on VACUUM INTO).
import { existsSync, mkdirSync, readdirSync, statSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { createClient } from '@libsql/client'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { createBackup, integrityOf, pruneBackups, restoreBackup } from '../../scripts/lib/backup'
import { signIn } from '../support/http'
import { CLIENT_A, TRAINER_A } from '../support/people'
import { ROOT, filesDirFor, startStack, tempDatabaseUrl, type Stack } from '../support/stack'

const DOG_A = seedId('dog:fairweather')
let stack: Stack

beforeAll(async () => { stack = await startStack({ label: 'backup' }) })
afterAll(async () => { await stack?.stop() })

async function count(url: string, sql: string): Promise<number> {
  const db = createClient({ url })
  try { return Number((await db.execute(sql)).rows[0]![0]) }
  finally { db.close() }
}

const files = (dir: string) => readdirSync(dir, { recursive: true, withFileTypes: true }).filter(e => e.isFile()).map(e => join(e.parentPath, e.name).slice(dir.length)).sort()

describe('backup and restore', () => {
  it('takes a consistent, checked backup while sessions are being written, and restores it', async () => {
    const trainer = await signIn(stack.baseUrl, TRAINER_A)
    const today = new Date().toISOString().slice(0, 10)
    let stop = false
    const statuses: number[] = []
    // The write load: three writers adding training sessions (each with its audit row) without pause.
    const writers = [0, 1, 2].map(async () => {
      while (!stop) {
        const res = await trainer.post(`/api/clients/${CLIENT_A}/training-sessions`, { dogId: DOG_A, stage: 'discrimination', blind: true, trials: [], day: today })
        statuses.push(res.status)
      }
    })
    await new Promise(r => setTimeout(r, 400))
    const into = resolve(ROOT, `tests/.tmp/backups-${Date.now()}`)
    const sessions = 'SELECT count(*) FROM training_sessions'
    const before = await count(stack.databaseUrl, sessions)
    const { dir, manifest } = await createBackup({ databaseUrl: stack.databaseUrl, filesDir: filesDirFor(stack.databaseUrl), into })
    const after = await count(stack.databaseUrl, sessions)
    await new Promise(r => setTimeout(r, 200))
    stop = true
    await Promise.all(writers)

    expect(statuses.length).toBeGreaterThan(5)
    expect(statuses.every(s => s === 201), JSON.stringify(statuses)).toBe(true)
    expect(manifest.database.integrity).toBe('ok')
    expect((statSync(dir).mode & 0o777).toString(8)).toBe('700')
    expect((statSync(join(dir, 'forescent.db')).mode & 0o777).toString(8)).toBe('600')
    const copyUrl = `file:${join(dir, 'forescent.db')}`
    const inCopy = await count(copyUrl, sessions)
    expect(inCopy).toBeGreaterThanOrEqual(before)
    expect(inCopy).toBeLessThanOrEqual(after)
    // One moment: no row without the rows it belongs to.
    expect(await count(copyUrl, 'SELECT count(*) FROM pragma_foreign_key_check')).toBe(0)
    expect('copied' in manifest.files && manifest.files.copied).toBeGreaterThan(0)
    expect('missing' in manifest.files && manifest.files.missing).toEqual([])

    // Restore into a new place, as on a replacement machine.
    const restoredUrl = tempDatabaseUrl('restored')
    const restoredFiles = `${filesDirFor(restoredUrl)}`
    await restoreBackup({ backupDir: dir, databaseUrl: restoredUrl, filesDir: restoredFiles })
    const restoredPath = restoredUrl.replace(/^file:/, '')
    expect(await integrityOf(restoredPath)).toBe('ok')
    expect(await count(restoredUrl, sessions)).toBe(inCopy)
    expect((statSync(restoredPath).mode & 0o777).toString(8)).toBe('600')
    expect(files(restoredFiles)).toEqual(files(join(dir, 'files')))

    // A damaged backup is refused, and the restored copy stays as it was.
    const { writeFileSync } = await import('node:fs')
    writeFileSync(join(dir, 'forescent.db'), 'not a database')
    await expect(restoreBackup({ backupDir: dir, databaseUrl: restoredUrl, filesDir: restoredFiles })).rejects.toThrow(/does not match its manifest/)
    expect(await count(restoredUrl, sessions)).toBe(inCopy)

    // The schedule keeps the newest n.
    mkdirSync(join(into, 'forescent-20000101T000000Z'))
    expect(pruneBackups(into, 1)).toEqual(['forescent-20000101T000000Z'])
    expect(existsSync(dir)).toBe(true)
  })
})
