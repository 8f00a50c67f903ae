import { describe, expect, it } from 'vitest'
import { classifyAnswer, dependentsOf, moveLegacyTrialQueue, outboxSummary, refsIn, refTo, resolveRefs, sendOrder, type OutboxItem } from '../../shared/utils/outbox'

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

  it('names the records that need one, directly or through another, so discarding it discards them too', () => {
    const session = item({ key: 'session-key-0001' })
    const trial = item({ key: 'trial-key-00001', url: `/api/training-sessions/${refTo('session-key-0001')}/trials` })
    const undo = item({ key: 'undo-key-000001', method: 'DELETE', url: `/api/training-trials/${refTo('trial-key-00001')}` })
    const other = item({ key: 'other-key-00001' })
    expect(dependentsOf([session, trial, undo, other], 'session-key-0001').sort()).toEqual(['trial-key-00001', 'undo-key-000001'])
    expect(dependentsOf([session, trial, undo, other], 'other-key-00001')).toEqual([])
  })
})

describe('the old localStorage trial queue moves onto the outbox', () => {
  const entry = '3f1c2a4e-9b7d-4c1e-8a2f-1b2c3d4e5f60'
  const old = JSON.stringify({
    queue: [
      { entryKey: entry, sessionId: 'sess-1', clientId: 'c1', stations: 3, targetStation: 2, indicatedStation: 2, queuedAt: '2026-05-04T09:00:00.000Z' },
      { entryKey: 'aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee', sessionId: 'sess-1', clientId: 'c1', stations: 3, targetStation: null, indicatedStation: 1, undo: true, queuedAt: '2026-05-04T09:01:00.000Z' },
      { entryKey: 'short', sessionId: 'sess-1', stations: 3, targetStation: 1, indicatedStation: 1 },
      { entryKey: 'bbbbbbbb-bbbb-cccc-dddd-eeeeeeeeeeee', sessionId: '../x', stations: 3, targetStation: 1, indicatedStation: 1 },
      { entryKey: 'cccccccc-bbbb-cccc-dddd-eeeeeeeeeeee', sessionId: 'sess-1', stations: 3, targetStation: 'one', indicatedStation: 1 },
    ],
    open: { c1: { sessionId: 'sess-1', day: '2026-05-04', openedAt: '2026-05-04T08:55:00.000Z' }, c2: { sessionId: 7 } },
  })

  it('sends each trial to its session with its own entry key, and an undone one then removes it', () => {
    const moved = moveLegacyTrialQueue(old)
    expect(moved.records).toEqual([
      { key: entry, label: 'Trial kept by an earlier version of the app', method: 'POST', url: '/api/training-sessions/sess-1/trials', body: { stations: 3, targetStation: 2, indicatedStation: 2, entryKey: entry }, tappedAt: '2026-05-04T09:00:00.000Z' },
      { key: 'aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee', label: 'Trial kept by an earlier version of the app', method: 'POST', url: '/api/training-sessions/sess-1/trials', body: { stations: 3, targetStation: null, indicatedStation: 1, entryKey: 'aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee' }, tappedAt: '2026-05-04T09:01:00.000Z' },
      { key: 'aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee-undo', label: 'Undo of a trial kept by an earlier version of the app', method: 'DELETE', url: `/api/training-trials/${refTo('aaaaaaaa-bbbb-cccc-dddd-eeeeeeeeeeee')}`, tappedAt: '2026-05-04T09:01:00.000Z' },
    ])
    expect(moved.open).toEqual({ c1: { key: 'legacy-session-sess-1', sessionId: 'sess-1', day: '2026-05-04', openedAt: '2026-05-04T08:55:00.000Z' } })
  })

  it('moves nothing from nothing, or from what it cannot read', () => {
    for (const raw of [null, undefined, '', 'not json', '{}', '{"queue":"x"}', '[]']) expect(moveLegacyTrialQueue(raw)).toEqual({ records: [], open: {} })
  })
})
