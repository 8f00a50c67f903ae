import { describe, expect, it } from 'vitest'
import { decideRequestKey, readTappedAt, takesRequestKey, STALE_PENDING_MS, TAPPED_AHEAD_LIMIT_MS, type StoredRequestKey } from '../../shared/utils/request-keys'

const now = new Date('2026-05-04T09:30:00Z')
const stored = (over: Partial<StoredRequestKey> = {}): StoredRequestKey => ({
  userId: 'u1', method: 'POST', path: '/api/clients/c1/diary', bodyHash: 'h1', state: 'done', receivedAt: new Date(now.getTime() - 1000), ...over,
})
const req = { userId: 'u1', method: 'POST', path: '/api/clients/c1/diary', bodyHash: 'h1', now }

describe('request keys', () => {
  it('a new key is handled; a finished one is answered again', () => {
    expect(decideRequestKey(null, req)).toEqual({ kind: 'new' })
    expect(decideRequestKey(stored(), req)).toEqual({ kind: 'replay' })
  })
  it('another person’s key answers not found, whatever its state', () => {
    for (const state of ['pending', 'applied', 'done'] as const) {
      expect(decideRequestKey(stored({ state }), { ...req, userId: 'u2' }).kind).toBe('not-found')
    }
  })
  it('the same key on another route or with other content is refused', () => {
    expect(decideRequestKey(stored(), { ...req, path: '/api/clients/c2/diary' }).kind).toBe('mismatch')
    expect(decideRequestKey(stored(), { ...req, method: 'PUT' }).kind).toBe('mismatch')
    expect(decideRequestKey(stored(), { ...req, bodyHash: 'h2' }).kind).toBe('mismatch')
    // A body that could not be hashed (a file upload) is matched by route only.
    expect(decideRequestKey(stored({ bodyHash: null }), { ...req, bodyHash: null }).kind).toBe('replay')
  })
  it('a send still being handled waits; one stuck past the limit is handled anew; a committed one is not redone', () => {
    expect(decideRequestKey(stored({ state: 'pending' }), req).kind).toBe('in-progress')
    const old = new Date(now.getTime() - STALE_PENDING_MS - 1)
    expect(decideRequestKey(stored({ state: 'pending', receivedAt: old }), req).kind).toBe('retry-stale')
    expect(decideRequestKey(stored({ state: 'applied', receivedAt: old }), req).kind).toBe('already-applied')
  })
  it('a tapped time is optional, must carry its offset and may be at most five minutes ahead', () => {
    expect(readTappedAt(undefined, now)).toEqual({ ok: true, at: null })
    expect(readTappedAt('2026-05-04T09:00:00Z', now)).toEqual({ ok: true, at: new Date('2026-05-04T09:00:00Z') })
    expect(readTappedAt(new Date(now.getTime() + TAPPED_AHEAD_LIMIT_MS).toISOString(), now).ok).toBe(true)
    const ahead = readTappedAt(new Date(now.getTime() + TAPPED_AHEAD_LIMIT_MS + 60_000).toISOString(), now)
    expect(ahead).toEqual({ ok: false, message: expect.stringMatching(/clock is 6 minutes ahead/) })
    expect(readTappedAt('2026-05-04 09:00', now).ok).toBe(false)
    expect(readTappedAt('2026-13-45T09:00:00Z', now).ok).toBe(false)
  })
  it('every POST and PUT under /api takes a key, except sign-in, webhooks and resumable uploads', () => {
    expect(takesRequestKey('POST', '/api/clients/c1/diary')).toBe(true)
    expect(takesRequestKey('PUT', '/api/samples/s1/answers')).toBe(true)
    expect(takesRequestKey('PATCH', '/api/diary-entries/d1')).toBe(false)
    expect(takesRequestKey('POST', '/api/auth/login')).toBe(false)
    expect(takesRequestKey('POST', '/api/webhooks/stripe')).toBe(false)
    expect(takesRequestKey('POST', '/api/homework-uploads')).toBe(false)
  })
})
