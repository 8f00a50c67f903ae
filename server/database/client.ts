import { mkdirSync, existsSync } from 'node:fs'
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
export function openDatabase(url = DEFAULT_DATABASE_URL, authToken?: string): { client: Client, db: Database } {
  if (url.startsWith('file:')) {
    const path = url.slice('file:'.length)
    if (path && path !== ':memory:') mkdirSync(dirname(resolve(path)), { recursive: true })
  }
  // `timeout` is applied by the client to every pooled connection as SQLite's busy timeout; libSQL opens
  // connections with foreign keys enforced. Both hold inside transactions (see tests/integration/db.test.ts).
  const client = createClient({ url, authToken: authToken || undefined, timeout: BUSY_TIMEOUT_MS })
  return { client, db: drizzle(client, { schema }) }
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
