import { sql } from 'drizzle-orm'
import { describe, expect, it } from 'vitest'
import { openDatabase, prepareDatabase, migrateDatabase, BUSY_TIMEOUT_MS } from '../../server/database/client'
import { tempDatabaseUrl } from '../support/stack'

describe('database connections', () => {
  it('enforce foreign keys, WAL and the busy timeout on every connection, inside transactions too', async () => {
    const url = tempDatabaseUrl('pragmas')
    // Without the in-process write queue, so two transactions really hold two pooled connections at once.
    const { client, db } = openDatabase(url, undefined, { serialiseWrites: false })
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

describe('writes from one process', () => {
  it('never deadlock: concurrent transactions and single writes all finish, in order, well before the busy timeout', async () => {
    const url = tempDatabaseUrl('writes')
    const { client, db } = openDatabase(url) // with serialiseWrites: false this fails with SQLITE_BUSY after the busy timeout (checked)
    await prepareDatabase(client, url)
    await migrateDatabase(db)
    await client.execute(`INSERT INTO users (id, email, name, role) VALUES ('u1', 'u1@example.test', 'U', 'trainer')`)
    const started = Date.now()
    const tx = (n: number) => db.transaction(async (t) => {
      await t.run(sql`insert into audit_log (action, entity_type, entity_id) values ('test', 'tx', ${String(n)})`)
      await new Promise(r => setTimeout(r, 20)) // awaiting inside a transaction lets the others run
      await t.run(sql`insert into audit_log (action, entity_type, entity_id) values ('test', 'tx', ${`${n}b`})`)
    })
    const single = (n: number) => db.run(sql`insert into audit_log (action, entity_type, entity_id) values ('test', 'single', ${String(n)})`)
    await Promise.all([tx(1), single(1), tx(2), single(2), tx(3), client.execute('select count(*) from audit_log')])
    const elapsed = Date.now() - started
    const rows = (await client.execute(`select entity_id from audit_log where entity_type = 'tx' order by id`)).rows.map(r => r[0])
    // Each transaction's two rows stay together: nobody wrote in between.
    expect(rows).toEqual(['1', '1b', '2', '2b', '3', '3b'])
    expect(Number((await client.execute(`select count(*) from audit_log where entity_type = 'single'`)).rows[0]![0])).toBe(2)
    expect(elapsed).toBeLessThan(BUSY_TIMEOUT_MS)
    client.close()
  })
})
