import { describe, expect, it } from 'vitest'
import { openDatabase, prepareDatabase, migrateDatabase, BUSY_TIMEOUT_MS } from '../../server/database/client'
import { tempDatabaseUrl } from '../support/stack'

describe('database connections', () => {
  it('enforce foreign keys, WAL and the busy timeout on every connection, inside transactions too', async () => {
    const url = tempDatabaseUrl('pragmas')
    const { client, db } = openDatabase(url)
    await prepareDatabase(client, url)
    await migrateDatabase(db)
    const read = async (t: { execute: typeof client.execute }) => ({
      fk: Number((await t.execute('PRAGMA foreign_keys')).rows[0]![0]),
      timeout: Number((await t.execute('PRAGMA busy_timeout')).rows[0]![0]),
      journal: String((await t.execute('PRAGMA journal_mode')).rows[0]![0]),
    })
    expect(await read(client)).toEqual({ fk: 1, timeout: BUSY_TIMEOUT_MS, journal: 'wal' })
    // Two transactions open at once run on two pooled connections: each must carry the settings.
    const t1 = await client.transaction('write')
    const t2 = await client.transaction('read')
    expect(await read(t1)).toEqual({ fk: 1, timeout: BUSY_TIMEOUT_MS, journal: 'wal' })
    expect(await read(t2)).toEqual({ fk: 1, timeout: BUSY_TIMEOUT_MS, journal: 'wal' })
    // And the foreign key really is enforced inside the transaction.
    await expect(t1.execute({ sql: 'INSERT INTO clients (id, trainer_id, household_name, person_name, condition) VALUES (?, ?, ?, ?, ?)', args: ['c1', 'no-such-user', 'H', 'P', 'migraine'] }))
      .rejects.toThrow(/FOREIGN KEY/)
    await t1.rollback()
    await t2.rollback()
    client.close()
  })
})
