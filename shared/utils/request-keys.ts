// Exactly-once sending: every record a phone sends carries a key made on the phone (its request key). The server
// keeps the key with the first answer, so the same send repeated after a lost answer is answered again instead of
// making the record twice. Pure rules here; the middleware in server/middleware/2.request-key.ts applies them.

export const REQUEST_KEY_HEADER = 'idempotency-key' // the IETF draft "The Idempotency-Key HTTP Header Field"
export const TAPPED_AT_HEADER = 'x-tapped-at'
export const REQUEST_KEY_STATES = ['pending', 'applied', 'done'] as const
export type RequestKeyState = (typeof REQUEST_KEY_STATES)[number]

/** A key: 16 to 100 letters, digits, "-" or "_" (a UUID made by crypto.randomUUID() is 36). */
export const REQUEST_KEY_PATTERN = /^[\w-]{16,100}$/
/** A tapped time may be ahead of the server's clock by this much (phone clocks drift; common practice). */
export const TAPPED_AHEAD_LIMIT_MS = 5 * 60_000
/** A first send still "pending" after this long died before its transaction committed (common practice). */
export const STALE_PENDING_MS = 2 * 60_000
/** Keys and their stored answers are kept this long: longer than a queue waits on a phone (see docs/offline.md). */
export const REQUEST_KEY_KEEP_DAYS = 90

export interface StoredRequestKey {
  userId: string
  method: string
  path: string
  bodyHash: string | null
  state: RequestKeyState
  receivedAt: Date
}
export interface IncomingRequest { userId: string, method: string, path: string, bodyHash: string | null, now: Date }

export type KeyDecision =
  | { kind: 'new' } // no such key: handle the request and remember the answer
  | { kind: 'replay' } // answer the stored result again
  | { kind: 'already-applied' } // the record was made but its answer was lost with the server: say so
  | { kind: 'retry-stale' } // the first send died before committing: handle this one as new
  | { kind: 'in-progress', message: string }
  | { kind: 'not-found', message: string }
  | { kind: 'mismatch', message: string }

/** What to do with a request whose key may have been seen before. */
export function decideRequestKey(stored: StoredRequestKey | null | undefined, req: IncomingRequest): KeyDecision {
  if (!stored) return { kind: 'new' }
  // Another person's key reveals nothing about their record: the same answer as a record that does not exist.
  if (stored.userId !== req.userId) return { kind: 'not-found', message: 'Not found.' }
  if (stored.method !== req.method || stored.path !== req.path || (stored.bodyHash && req.bodyHash && stored.bodyHash !== req.bodyHash)) {
    return { kind: 'mismatch', message: 'This record key was already used for a different record. Send it with a new key.' }
  }
  if (stored.state === 'done') return { kind: 'replay' }
  if (stored.state === 'applied') return { kind: 'already-applied' }
  if (req.now.getTime() - stored.receivedAt.getTime() > STALE_PENDING_MS) return { kind: 'retry-stale' }
  return { kind: 'in-progress', message: 'The first send of this record is still being handled. Try again in a moment.' }
}

export type TappedAt = { ok: true, at: Date | null } | { ok: false, message: string }

/** Reads the X-Tapped-At header (an ISO 8601 instant): absent is fine; unreadable or too far ahead is refused. */
export function readTappedAt(value: string | null | undefined, now: Date): TappedAt {
  if (value === undefined || value === null || value === '') return { ok: true, at: null }
  if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})$/.test(value.trim())) {
    return { ok: false, message: 'The tapped time must be a date and time with its offset, like 2026-05-04T09:30:00Z.' }
  }
  const at = new Date(value.trim())
  if (Number.isNaN(at.getTime())) return { ok: false, message: 'The tapped time is not a real date and time.' }
  if (at.getTime() - now.getTime() > TAPPED_AHEAD_LIMIT_MS) {
    const minutes = Math.round((at.getTime() - now.getTime()) / 60_000)
    return { ok: false, message: `The phone's clock is ${minutes} minutes ahead of the server's. Set the phone's date and time to automatic, then send again.` }
  }
  return { ok: true, at }
}

/** Routes that take a request key: every POST and PUT under /api except sign-in, webhooks and resumable uploads. */
export function takesRequestKey(method: string, path: string): boolean {
  if (method !== 'POST' && method !== 'PUT') return false
  const p = path.split('?')[0]!
  if (!p.startsWith('/api/')) return false
  return !/^\/api\/(auth|webhooks|homework-uploads)(\/|$)/.test(p)
}
