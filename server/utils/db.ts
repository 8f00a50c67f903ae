import type { Client } from '@libsql/client'
import { openDatabase, DEFAULT_DATABASE_URL, type Database } from '../database/client'
import * as schema from '../database/schema'

export { schema }
export type { Database }
export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]
export type DbOrTx = Database | Tx

let opened: { client: Client, db: Database } | undefined

export function databaseUrl(): string {
  return process.env.DATABASE_URL || useRuntimeConfig().databaseUrl || DEFAULT_DATABASE_URL
}

export function useDbClient(): Client {
  opened ??= openDatabase(databaseUrl(), process.env.DATABASE_AUTH_TOKEN || useRuntimeConfig().databaseAuthToken)
  return opened.client
}

/** The one accessor for the database. */
export function useDb(): Database {
  useDbClient()
  return opened!.db
}
