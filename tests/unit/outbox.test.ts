import { describe, expect, it } from 'vitest'
import { classifyAnswer, outboxSummary, refsIn, refTo, resolveRefs, sendOrder, type OutboxItem } from '../../shared/utils/outbox'

let seq = 0
const item = (over: Partial<OutboxItem> = {}): OutboxItem => ({
  key: `k${++seq}`, userId: 'u1', label: 'Alert', method: 'POST', url: '/api/clients/c1/diary', body: {},
  tappedAt: '2026-05-04T09:00:00Z', queuedAt: '2026-05-04T09:00:00Z', seq, attempts: 0, ...over,
})

describe('outbox', () => {
  it('fills in the ids of earlier records, and waits while one is unknown', () => {
    const trial = item({ url: `/api/training-sessions/${refTo('s1')}/trials`, body: { sessionRef: refTo('s1'), n: 1 } })
    expect(refsIn(trial)).toEqual(['s1'])
    expect(resolveRefs(trial.url, {})).toBeNull()
    expect(resolveRefs(trial.url, { s1: 'abc' })).toBe('/api/training-sessions/abc/trials')
    expect(resolveRefs(trial.body, { s1: 'abc' })).toEqual({ sessionRef: 'abc', n: 1 })
  })
  it('reads answers: retry without signal, on server errors and signed-out; sent when already received; refused otherwise', () => {
    expect(classifyAnswer(undefined, 'POST')).toBe('retry')
    expect(classifyAnswer(503, 'POST')).toBe('retry')
    expect(classifyAnswer(401, 'POST')).toBe('retry')
    expect(classifyAnswer(429, 'POST')).toBe('retry')
    expect(classifyAnswer(201, 'POST')).toBe('sent')
    expect(classifyAnswer(409, 'POST', { alreadyReceived: true })).toBe('sent')
    expect(classifyAnswer(409, 'POST', { retry: true })).toBe('retry')
    expect(classifyAnswer(404, 'DELETE')).toBe('sent')
    expect(classifyAnswer(404, 'POST')).toBe('refused')
    expect(classifyAnswer(422, 'POST')).toBe('refused')
  })
  it('sends this person’s records in tap order, holding back those that need a refused one', () => {
    const session = item({ key: 'sess', refused: { status: 422, message: 'Bad day' } })
    const trial = item({ url: `/api/training-sessions/${refTo('sess')}/trials` })
    const undo = item({ method: 'DELETE', url: `/api/training-trials/${refTo(trial.key)}` })
    const alert = item({ seq: 0 })
    const othersAlert = item({ userId: 'u2' })
    expect(sendOrder([session, trial, undo, alert, othersAlert], 'u1').map(i => i.key)).toEqual([alert.key])
    expect(sendOrder([{ ...session, refused: undefined }, trial, undo], 'u1').map(i => i.key)).toEqual(['sess', trial.key, undo.key])
  })
  it('says how many records wait and when they were last tried', () => {
    const now = new Date('2026-05-04T10:00:00Z')
    expect(outboxSummary([], now)).toBeNull()
    const a = item({ lastTriedAt: '2026-05-04T09:58:00Z' })
    const b = item({ lastTriedAt: '2026-05-04T09:50:00Z' })
    const c = item()
    expect(outboxSummary([a, b, c], now)).toBe('3 records waiting to send, last tried 2 min ago')
    expect(outboxSummary([c], now)).toBe('1 record waiting to send, not tried yet')
    expect(outboxSummary([a, { ...b, refused: { status: 422, message: 'x' } }], now)).toBe('1 record waiting to send, 1 refused by the server, last tried 2 min ago')
  })
})
