// Exactly once: every route that creates something, sent twice with the same record key (the first answer lost
// on the way back to the phone), answers the same twice and makes its rows once. The routes and their bodies come
// from the authorization matrix rows, so a new route is covered as soon as it has its row.
import { randomUUID } from 'node:crypto'
import { createClient as libsql } from '@libsql/client'
import { describe, expect, inject, it } from 'vitest'
import { signIn } from '../support/http'
import { ACTORS, loadRows, type Actor, type Row } from '../support/authz'
import { ADMIN, CLIENT_A, HANDLER_A, HANDLER_B, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { takesRequestKey } from '../../shared/utils/request-keys'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')

const ROWS: Row[] = await loadRows()

/** Rows in every table except the request keys themselves. */
async function tableCounts(): Promise<Record<string, number>> {
  const db = libsql({ url: databaseUrl })
  try {
    const tables = (await db.execute(`select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like '__drizzle%' and name != 'request_keys'`)).rows.map(r => String(r.name))
    const out: Record<string, number> = {}
    for (const t of tables) out[t] = Number((await db.execute(`select count(*) n from "${t}"`)).rows[0]!.n)
    return out
  }
  finally { db.close() }
}

const ok = (status: number) => status >= 200 && status < 300
const statusOf = (e: Row['expect'][Actor]) => (typeof e === 'number' ? e : e.status)

const creating = ROWS.filter((row) => {
  const [method, path] = row.route.split(' ') as [string, string]
  return takesRequestKey(row.method ?? method, path) && Object.values(row.expect).some(e => ok(statusOf(e)))
})

describe('a repeated send after a lost answer makes nothing twice', () => {
  it('covers the creating routes', () => {
    expect(creating.length).toBeGreaterThan(30)
  })
  for (const row of creating) {
    it(row.route, async () => {
      await resetDatabase(databaseUrl)
      const ctx = row.prepare ? await row.prepare(await signIn(baseUrl, ADMIN)) : {}
      const actor = (['admin', 'trainerA', 'handlerA', 'trainerB', 'handlerB'] as Actor[]).find(a => ok(statusOf(row.expect[a])))!
      const agent = await signIn(baseUrl, ACTORS[actor]!)
      const method = row.method ?? row.route.split(' ')[0]!
      const path = typeof row.path === 'function' ? row.path(actor, ctx) : row.path
      const key = randomUUID()
      // The very same request twice, as the phone's outbox repeats it (bodies made from the clock are made once).
      const body = typeof row.body === 'function' ? (row.body as (a: Actor, c: typeof ctx) => unknown)(actor, ctx) : row.body
      const send = async () => {
        if (row.raw) {
          const raw = row.raw(actor, ctx)
          return agent.request(method, path, raw.body as string, { ...(raw.contentType ? { 'content-type': raw.contentType } : {}), ...raw.headers, 'idempotency-key': key })
        }
        return agent.request(method, path, body ?? {}, { 'idempotency-key': key })
      }
      const first = await send()
      expect(ok(first.status), `${first.status} ${JSON.stringify(first.body)}`).toBe(true)
      const after = await tableCounts()
      const again = await send()
      expect(again.status).toBe(first.status)
      expect(again.body).toEqual(first.body)
      expect(again.headers.get('idempotent-replayed')).toBe('true')
      expect(await tableCounts()).toEqual(after)
    })
  }
})

describe('record keys and tapped times', () => {
  const alert = () => ({ kind: 'alert', occurredAt: new Date(Date.now() - 60_000).toISOString() })
  const countEntries = async () => {
    const db = libsql({ url: databaseUrl })
    try { return Number((await db.execute({ sql: 'select count(*) n from diary_entries where client_id = ?', args: [CLIENT_A] })).rows[0]!.n) }
    finally { db.close() }
  }

  it('another person sending the same key gets 404 and nothing of the first record', async () => {
    await resetDatabase(databaseUrl)
    const key = randomUUID()
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = await countEntries()
    const first = await handler.post(`/api/clients/${CLIENT_A}/diary`, alert(), { 'idempotency-key': key })
    expect(first.status).toBe(201)
    for (const email of [HANDLER_B, TRAINER_A, ADMIN]) {
      const other = await signIn(baseUrl, email)
      const res = await other.post(`/api/clients/${CLIENT_A}/diary`, alert(), { 'idempotency-key': key })
      expect(res.status, email).toBe(404)
      expect(JSON.stringify(res.body)).not.toContain(first.body.id)
    }
    expect(await countEntries()).toBe(before + 1)
  })

  it('keeps the tapped time beside the time received, and refuses a tapped time far ahead of the server', async () => {
    await resetDatabase(databaseUrl)
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = await countEntries()
    const key = randomUUID()
    const tappedAt = new Date(Date.now() - 7 * 60_000).toISOString()
    const res = await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alert', occurredAt: tappedAt }, { 'idempotency-key': key, 'x-tapped-at': tappedAt })
    expect(res.status).toBe(201)
    const db = libsql({ url: databaseUrl })
    try {
      const [row] = (await db.execute({ sql: 'select tapped_at, received_at, state from request_keys where key = ?', args: [key] })).rows
      expect(Number(row!.tapped_at)).toBe(Date.parse(tappedAt))
      expect(Number(row!.received_at)).toBeGreaterThan(Date.parse(tappedAt) + 6 * 60_000)
      expect(row!.state).toBe('done')
    }
    finally { db.close() }
    // Ten minutes ahead is past the five-minute allowance for a drifting phone clock (common practice).
    const ahead = new Date(Date.now() + 10 * 60_000).toISOString()
    const refused = await handler.post(`/api/clients/${CLIENT_A}/diary`, alert(), { 'idempotency-key': randomUUID(), 'x-tapped-at': ahead })
    expect(refused.status).toBe(422)
    expect(refused.body.message).toMatch(/clock is 10 minutes ahead/)
    expect(await countEntries()).toBe(before + 1)
  })

  it('a refused first send frees its key for the corrected record; the same key with other content is refused', async () => {
    await resetDatabase(databaseUrl)
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = await countEntries()
    const key = randomUUID()
    const bad = await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alert', occurredAt: 'soon' }, { 'idempotency-key': key })
    expect(bad.status).toBe(422)
    const good = await handler.post(`/api/clients/${CLIENT_A}/diary`, alert(), { 'idempotency-key': key })
    expect(good.status).toBe(201)
    const other = await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'episode', occurredAt: new Date().toISOString() }, { 'idempotency-key': key })
    expect(other.status).toBe(422)
    expect(other.body.message).toMatch(/already used for a different record/)
    const malformed = await handler.post(`/api/clients/${CLIENT_A}/diary`, alert(), { 'idempotency-key': 'short' })
    expect(malformed.status).toBe(400)
    expect(await countEntries()).toBe(before + 1)
  })
})
