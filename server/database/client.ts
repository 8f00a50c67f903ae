import { chmodSync, closeSync, existsSync, mkdirSync, openSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { createClient, type Client } from '@libsql/client'
import { drizzle, type LibSQLDatabase } from 'drizzle-orm/libsql'
import { migrate } from 'drizzle-orm/libsql/migrator'
import * as schema from './schema'

export type Database = LibSQLDatabase<typeof schema>
export const DEFAULT_DATABASE_URL = 'file:./data/forescent.db'
// How long a connection waits for another writer before giving up (common practice for SQLite web apps).
export const BUSY_TIMEOUT_MS = 5000

/** Opens the database named by url (an SQLite file or a libSQL server) with our connection settings. */
export function openDatabase(url = DEFAULT_DATABASE_URL, authToken?: string, opts: { serialiseWrites?: boolean } = {}): { client: Client, db: Database } {
  if (url.startsWith('file:')) {
    const path = url.slice('file:'.length)
    if (path && path !== ':memory:') protectDatabaseFile(path)
  }
  // `timeout` is applied by the client to every pooled connection as SQLite's busy timeout; libSQL opens
  // connections with foreign keys enforced. Both hold inside transactions (see tests/integration/db.test.ts).
  const raw = createClient({ url, authToken: authToken || undefined, timeout: BUSY_TIMEOUT_MS })
  const serialised = url.startsWith('file:') && opts.serialiseWrites !== false ? serialiseWrites(raw) : raw
  const client = withCommitHook(serialised)
  return { client, db: drizzle(client, { schema }) }
}

/**
 * The database holds health and payment data: its folder is created 0700 and the file 0600 (owner only), before
 * SQLite opens it. SQLite gives its -wal and -shm files the database file's permissions, so they are 0600 too; files
 * left readable by an older version are tightened here as well.
 */
export function protectDatabaseFile(path: string) {
  const full = resolve(path.split('?')[0]!)
  const dir = dirname(full)
  if (!existsSync(dir)) mkdirSync(dir, { recursive: true, mode: 0o700 })
  if (!existsSync(full)) closeSync(openSync(full, 'a', 0o600))
  for (const f of [full, `${full}-wal`, `${full}-shm`]) {
    if (existsSync(f)) chmodSync(f, 0o600)
  }
}

/** Statements to run inside every transaction just before it commits (e.g. marking a request key as applied). */
export type BeforeCommit = () => { sql: string, args: (string | number | null)[] } | null
let beforeCommit: BeforeCommit | null = null
export function setBeforeCommit(fn: BeforeCommit | null) { beforeCommit = fn }

/**
 * Runs the registered before-commit statement in the transaction itself, so what it records commits or rolls back
 * with the transaction's own writes (the request key of a record is marked applied together with the record).
 */
function withCommitHook(client: Client): Client {
  return new Proxy(client, {
    get(target, prop, receiver) {
      const v = Reflect.get(target, prop, receiver)
      if (prop !== 'transaction') return typeof v === 'function' ? v.bind(target) : v
      return async (...args: Parameters<Client['transaction']>) => {
        const tx = await (v as Client['transaction']).apply(target, args)
        return new Proxy(tx, {
          get(t, p, r) {
            const tv = Reflect.get(t, p, r)
            if (p === 'commit') {
              return async () => {
                const stmt = beforeCommit?.()
                if (stmt) await t.execute(stmt)
                return (tv as () => Promise<void>).call(t)
              }
            }
            return typeof tv === 'function' ? tv.bind(t) : tv
          },
        })
      }
    },
  })
}

const READ_ONLY = /^\s*(select\b|pragma\s+\w+\s*$|explain\b)/i

/**
 * The embedded SQLite driver is synchronous: a write that meets another connection's open write transaction waits
 * for the lock while blocking the event loop, so the transaction holding the lock can never finish (until the busy
 * timeout fails both). Within one process we therefore queue every write - transactions, batches and single
 * writing statements - behind one another; reads still run at once (WAL lets them read beside a writer).
 * Several processes sharing one file still rely on the busy timeout; a libSQL server needs none of this.
 */
export function serialiseWrites(client: Client): Client {
  let tail: Promise<void> = Promise.resolve()
  function lock(): Promise<() => void> {
    let release!: () => void
    const held = new Promise<void>((r) => { release = r })
    const ready = tail.then(() => release)
    tail = tail.then(() => held)
    return ready
  }
  async function withLock<T>(fn: () => Promise<T>): Promise<T> {
    const release = await lock()
    try { return await fn() }
    finally { release() }
  }
  const sqlOf = (stmt: unknown) => (typeof stmt === 'string' ? stmt : (stmt as { sql?: string })?.sql ?? '')
  return new Proxy(client, {
    get(target, prop, receiver) {
      if (prop === 'execute') {
        return (stmt: Parameters<Client['execute']>[0], ...rest: unknown[]) => (READ_ONLY.test(sqlOf(stmt))
          ? (target.execute as (...a: unknown[]) => ReturnType<Client['execute']>)(stmt, ...rest)
          : withLock(() => (target.execute as (...a: unknown[]) => ReturnType<Client['execute']>)(stmt, ...rest)))
      }
      if (prop === 'batch' || prop === 'migrate' || prop === 'executeMultiple') {
        const fn = Reflect.get(target, prop, receiver) as (...a: unknown[]) => Promise<unknown>
        return (...args: unknown[]) => withLock(() => fn.apply(target, args))
      }
      if (prop === 'transaction') {
        return async (...args: Parameters<Client['transaction']>) => {
          const release = await lock()
          let tx: Awaited<ReturnType<Client['transaction']>>
          try { tx = await target.transaction(...args) }
          catch (err) { release(); throw err }
          let done = false
          const finish = () => { if (!done) { done = true; release() } }
          return new Proxy(tx, {
            get(t, p, r) {
              const v = Reflect.get(t, p, r)
              if (p === 'commit' || p === 'rollback') {
                return async () => { try { return await (v as () => Promise<void>).call(t) } finally { finish() } }
              }
              if (p === 'close') return () => { try { (v as () => void).call(t) } finally { finish() } }
              return typeof v === 'function' ? v.bind(t) : v
            },
          })
        }
      }
      const v = Reflect.get(target, prop, receiver)
      return typeof v === 'function' ? v.bind(target) : v
    },
  })
}

/** Once per database file: write-ahead logging, so readers never wait for the writer. */
export async function prepareDatabase(client: Client, url: string) {
  if (url.startsWith('file:')) await client.execute('PRAGMA journal_mode = WAL')
  await client.execute('PRAGMA foreign_keys = ON')
}

/** Finds the committed drizzle-kit migrations, in the source tree or beside the built server. */
export function findMigrationsFolder(): string {
  const here = dirname(fileURLToPath(import.meta.url))
  const candidates = [
    process.env.MIGRATIONS_DIR,
    resolve(dirname(process.argv[1] || '.'), 'database/migrations'),
    resolve(here, 'migrations'),
    resolve(here, '../database/migrations'),
    resolve(process.cwd(), 'server/database/migrations'),
    resolve(process.cwd(), '.output/server/database/migrations'),
  ].filter((p): p is string => !!p)
  const found = candidates.find(p => existsSync(resolve(p, 'meta/_journal.json')))
  if (!found) throw new Error(`No database migrations found (looked in ${candidates.join(', ')}). Set MIGRATIONS_DIR.`)
  return found
}

export async function migrateDatabase(db: Database, folder = findMigrationsFolder()) {
  await migrate(db, { migrationsFolder: folder })
}
