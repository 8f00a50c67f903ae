import { createClient } from '@libsql/client'

/** Runs one statement against a test database file and returns its rows. */
export async function sqlRows<T = Record<string, unknown>>(databaseUrl: string, statement: string, args: (string | number)[] = []): Promise<T[]> {
  const db = createClient({ url: databaseUrl })
  try { return (await db.execute({ sql: statement, args })).rows as unknown as T[] }
  finally { db.close() }
}
