// Records made on a phone with no signal, as the server takes them when they arrive (docs/offline.md): quick-saved
// samples with the bag code made on the phone, bag-code prefixes reserved for phones, sample uses, homework notes
// and diary edits sent late, and the refusals a phone shows with their reason.
import { randomUUID } from 'node:crypto'
import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { signIn } from '../support/http'
import { CLIENT_A, HANDLER_A, HANDLER_B, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { isDevicePrefix, phoneBagCode } from '../../shared/utils/bag-codes'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')
const MIN = 60_000
const minutesAgo = (m: number) => new Date(Date.now() - m * MIN).toISOString()

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try {
    await db.execute('PRAGMA busy_timeout = 5000')
    return (await db.execute({ sql, args })).rows
  }
  finally { db.close() }
}

beforeEach(async () => { await resetDatabase(databaseUrl) })

describe('a quick save with the bag code made on the phone', () => {
  const quick = (bagCode: string, kind = 'target') => ({ kind, collectedAt: minutesAgo(3), firstSymptomsAt: kind === 'target' ? minutesAgo(12) : undefined, rolls: 2, bagCode })

  it('keeps the code written on the bag, once however often it is sent', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const key = randomUUID()
    const tappedAt = minutesAgo(3)
    const body = quick('T-ABC2D') // the very same record, as the outbox sends it again
    const first = await handler.post(`/api/clients/${CLIENT_A}/samples`, body, { 'idempotency-key': key, 'x-tapped-at': tappedAt })
    expect(first.status).toBe(201)
    expect(first.body).toMatchObject({ bagCode: 'T-ABC2D', kind: 'target', answersCompletedAt: null })
    const again = await handler.post(`/api/clients/${CLIENT_A}/samples`, body, { 'idempotency-key': key, 'x-tapped-at': tappedAt })
    expect(again.status).toBe(201)
    expect(again.body.id).toBe(first.body.id)
    expect(await query('select count(*) n from samples where client_id = ? and bag_code = ?', [CLIENT_A, 'T-ABC2D'])).toEqual([expect.objectContaining({ n: 1 })])
    const bank = await handler.get(`/api/clients/${CLIENT_A}/samples`)
    expect(bank.body.samples.find((s: { bagCode: string }) => s.bagCode === 'T-ABC2D')).toMatchObject({ status: 'awaiting-answers' })
  })

  it('refuses a real clash with a 409 that says to give the bag a new code, and makes nothing', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect((await handler.post(`/api/clients/${CLIENT_A}/samples`, quick('T-ABC2D'))).status).toBe(201)
    const before = await query('select count(*) n from samples')
    const clash = await trainer.post(`/api/clients/${CLIENT_A}/samples`, quick('T-ABC2D'), { 'idempotency-key': randomUUID() })
    expect(clash.status).toBe(409)
    expect(clash.body.message).toMatch(/already has the code T-ABC2D.*new code/)
    expect(clash.body.data.rules).toEqual(['bag-code-taken'])
    expect(await query('select count(*) n from samples')).toEqual(before)
    // Another household may have the same code: codes are per household, like the bags.
    const other = await signIn(baseUrl, HANDLER_B)
    expect((await other.post(`/api/clients/${seedId('client:achterberg')}/samples`, quick('T-ABC2D'))).status).toBe(201)
  })

  it('refuses a code of the other kind or not made by the app with a 422', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const wrongKind = await handler.post(`/api/clients/${CLIENT_A}/samples`, quick('C-ABC2D', 'target'))
    expect(wrongKind.status).toBe(422)
    expect(wrongKind.body.message).toMatch(/starts with T/)
    for (const bad of ['T-AB2D', 'T-ABC0D', 'hello', 'T-ABCDEF']) {
      const res = await handler.post(`/api/clients/${CLIENT_A}/samples`, quick(bad))
      expect(res.status, bad).toBe(422)
      expect(res.body.data.fieldErrors.bagCode).toMatch(/made by the Forescent app/)
    }
  })
})

describe('bag-code prefixes reserved for phones', () => {
  it('hands each phone its own prefix, once however often the request is sent', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const trainer = await signIn(baseUrl, TRAINER_A)
    const key = randomUUID()
    const a = await handler.post('/api/bag-code-prefixes', {}, { 'idempotency-key': key })
    const aAgain = await handler.post('/api/bag-code-prefixes', {}, { 'idempotency-key': key })
    const b = await handler.post('/api/bag-code-prefixes', {})
    const c = await trainer.post('/api/bag-code-prefixes', {})
    expect([a.status, aAgain.status, b.status, c.status]).toEqual([201, 201, 201, 201])
    expect(isDevicePrefix(a.body.prefix)).toBe(true)
    expect(aAgain.body.prefix).toBe(a.body.prefix)
    expect(new Set([a.body.prefix, b.body.prefix, c.body.prefix]).size).toBe(3)
    expect(await query('select count(*) n from bag_code_prefixes')).toEqual([expect.objectContaining({ n: 3 })])
    // A code made with the reserved prefix is taken as it is.
    const code = phoneBagCode('control', a.body.prefix, 0)
    const saved = await handler.post(`/api/clients/${CLIENT_A}/samples`, { kind: 'control', collectedAt: minutesAgo(1), rolls: 2, bagCode: code })
    expect(saved.body.bagCode).toBe(code)
  })

  it('stops one person at 50 prefixes with a message', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const db = libsql({ url: databaseUrl })
    try {
      const user = (await db.execute({ sql: 'select id from users where email = ?', args: [HANDLER_A] })).rows[0]!.id as string
      for (let i = 0; i < 50; i++) await db.execute({ sql: 'insert into bag_code_prefixes (prefix, reserved_by_id) values (?, ?)', args: [`old-${i}`, user] })
    }
    finally { db.close() }
    const res = await handler.post('/api/bag-code-prefixes', {})
    expect(res.status).toBe(422)
    expect(res.body.message).toMatch(/already hold 50/)
  })
})

describe('sample uses sent late from a phone', () => {
  const FRESH_TARGET = seedId('sample:fairweather:7') // collected 5 days ago, never used

  it('a take-out keeps the tapped time; the put-back sent twice closes it once; another time after that is refused', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const outAt = minutesAgo(20)
    const out = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt, stage: 'discrimination', sessionRef: null }, { 'idempotency-key': randomUUID(), 'x-tapped-at': outAt })
    expect(out.status).toBe(201)
    expect(new Date(out.body.use.outAt).toISOString()).toBe(outAt)
    const backAt = minutesAgo(17)
    const back = await handler.patch(`/api/sample-uses/${out.body.use.id}`, { backAt, discarded: false })
    expect(back.status).toBe(200)
    const again = await handler.patch(`/api/sample-uses/${out.body.use.id}`, { backAt, discarded: false })
    expect(again.status).toBe(200)
    expect(again.body.use.id).toBe(out.body.use.id)
    const other = await handler.patch(`/api/sample-uses/${out.body.use.id}`, { backAt: minutesAgo(10), discarded: false })
    expect(other.status).toBe(422)
    expect(other.body.message).toMatch(/already closed/)
    expect(await query('select count(*) n from sample_uses where sample_id = ?', [FRESH_TARGET])).toEqual([expect.objectContaining({ n: 1 })])
  })

  it('a take-out of a bag used up meanwhile on another phone is refused with the reason', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    for (let i = 0; i < 3; i++) {
      const res = await trainer.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(90 - i * 20), backAt: minutesAgo(87 - i * 20), stage: 'discrimination' })
      expect(res.status).toBe(201)
    }
    const handler = await signIn(baseUrl, HANDLER_A)
    const late = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(5), stage: 'discrimination' }, { 'idempotency-key': randomUUID() })
    expect(late.status).toBe(422)
    expect(late.body.data.rules).toContain('used-up')
    expect(late.body.message).toMatch(/used/i)
  })
})

describe('homework notes', () => {
  const ASSIGNMENT = seedId('assignment:fairweather:two-controls')

  it('take the moment of the tap as the practice time, and show on the homework for the household and the trainer', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const tappedAt = minutesAgo(90)
    const key = randomUUID()
    const body = { body: 'Garden, 6 tries: 5 alerts, one miss by the shed.' }
    const first = await handler.post(`/api/homework-assignments/${ASSIGNMENT}/notes`, body, { 'idempotency-key': key, 'x-tapped-at': tappedAt })
    expect(first.status).toBe(201)
    expect(new Date(first.body.practisedAt).toISOString()).toBe(tappedAt)
    const again = await handler.post(`/api/homework-assignments/${ASSIGNMENT}/notes`, body, { 'idempotency-key': key, 'x-tapped-at': tappedAt })
    expect(again.body.id).toBe(first.body.id)
    const detail = await handler.get(`/api/homework-assignments/${ASSIGNMENT}`)
    expect(detail.body.notes).toEqual([expect.objectContaining({ body: body.body, authorName: expect.any(String) })])
    const trainer = await signIn(baseUrl, TRAINER_A)
    const list = await trainer.get(`/api/clients/${CLIENT_A}/homework`)
    expect(list.body.rows.find((a: { id: string }) => a.id === ASSIGNMENT).notes).toHaveLength(1)
  })

  it('refuse a note for homework cancelled meanwhile, saying what to do, and empty or future notes', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect((await trainer.post(`/api/homework-assignments/${ASSIGNMENT}/cancel`, {})).status).toBe(200)
    const handler = await signIn(baseUrl, HANDLER_A)
    const late = await handler.post(`/api/homework-assignments/${ASSIGNMENT}/notes`, { body: 'Practised in the rain.' }, { 'idempotency-key': randomUUID() })
    expect(late.status).toBe(422)
    expect(late.body.message).toMatch(/cancelled.*discard it/)
    await resetDatabase(databaseUrl)
    const h = await signIn(baseUrl, HANDLER_A)
    expect((await h.post(`/api/homework-assignments/${ASSIGNMENT}/notes`, { body: '  ' })).status).toBe(422)
    expect((await h.post(`/api/homework-assignments/${ASSIGNMENT}/notes`, { body: 'x', practisedAt: new Date(Date.now() + 60 * MIN).toISOString() })).status).toBe(422)
    expect((await h.post(`/api/homework-assignments/${ASSIGNMENT}/notes`, { body: 'x', extra: 1 })).status).toBe(422)
    expect(await query('select count(*) n from homework_notes')).toEqual([expect.objectContaining({ n: 0 })])
  })
})

describe('diary edits sent late', () => {
  it('apply in the order they arrive: the last one wins; an edit of an entry removed meanwhile is refused with 404', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const created = await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alert', occurredAt: minutesAgo(30) }, { 'idempotency-key': randomUUID() })
    expect(created.status).toBe(201)
    expect((await handler.patch(`/api/diary-entries/${created.body.id}`, { place: 'Car park' })).status).toBe(200)
    expect((await handler.patch(`/api/diary-entries/${created.body.id}`, { place: 'Car park by the station' })).status).toBe(200)
    expect(await query('select place from diary_entries where id = ?', [created.body.id])).toEqual([expect.objectContaining({ place: 'Car park by the station' })])
    expect((await handler.delete(`/api/diary-entries/${created.body.id}`)).status).toBeLessThan(300)
    expect((await handler.patch(`/api/diary-entries/${created.body.id}`, { place: 'Home' })).status).toBe(404)
  })
})
