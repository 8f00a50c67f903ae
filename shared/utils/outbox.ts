// The phone's outbox: records made on the phone wait here until the server has them. Pure rules (what to send
// next, what an answer means, what to tell the person); the store in stores/outbox.ts keeps them in IndexedDB.

export type OutboxMethod = 'POST' | 'PUT' | 'PATCH' | 'DELETE'

export interface OutboxItem {
  /** Made on the phone; sent as the Idempotency-Key, so a repeat never makes the record twice. */
  key: string
  /** Whose record it is: sent only while this same person is signed in. */
  userId: string
  /** Shown to the person: "Alert at 14:05". */
  label: string
  method: OutboxMethod
  /** May name an earlier record's id as "@ref:<its key>", filled in once that record is on the server. */
  url: string
  body?: unknown
  /** The moment of the tap on the phone (sent as X-Tapped-At). */
  tappedAt: string
  queuedAt: string
  /** Order of the taps on this phone, so records go in the order they were made. */
  seq: number
  attempts: number
  lastTriedAt?: string
  /** The server refused it: kept with the reason until the person fixes or discards it. */
  refused?: { status: number, message: string }
}

export const REF_PREFIX = '@ref:'
export const refTo = (key: string) => `${REF_PREFIX}${key}`
const REF_PATTERN = /@ref:([\w-]+)/g

/** The keys of earlier records this one needs (its url or body names them). */
export function refsIn(item: Pick<OutboxItem, 'url' | 'body'>): string[] {
  const text = `${item.url} ${item.body === undefined ? '' : JSON.stringify(item.body)}`
  return [...new Set([...text.matchAll(REF_PATTERN)].map(m => m[1]!))]
}

/** Fills in "@ref:<key>" with the ids the server gave; null while one of them is still unknown. */
export function resolveRefs<T>(value: T, ids: Record<string, string>): T | null {
  let missing = false
  const fill = (s: string) => s.replace(REF_PATTERN, (_m, key: string) => {
    const id = ids[key]
    if (!id) { missing = true; return '' }
    return id
  })
  const walk = (v: unknown): unknown => {
    if (typeof v === 'string') return fill(v)
    if (Array.isArray(v)) return v.map(walk)
    if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, walk(x)]))
    return v
  }
  const out = walk(value) as T
  return missing ? null : out
}

export type AnswerKind = 'sent' | 'retry' | 'refused'

/**
 * What an answer means for a waiting record. No answer, a server error, a timeout, throttling or a signed-out
 * session: try again later (nothing is dropped). "Already received" (409 with alreadyReceived) and a DELETE of
 * something already gone: sent. Any other 4xx: refused, kept for the person to fix or discard.
 */
export function classifyAnswer(status: number | undefined, method: OutboxMethod, data?: unknown): AnswerKind {
  if (!status) return 'retry'
  if (status < 300) return 'sent'
  if (status >= 500 || status === 401 || status === 408 || status === 429) return 'retry'
  if (status === 409) {
    const d = data as { alreadyReceived?: boolean, retry?: boolean } | undefined
    if (d?.alreadyReceived) return 'sent'
    if (d?.retry) return 'retry'
  }
  if (status === 404 && method === 'DELETE') return 'sent'
  return 'refused'
}

/** The records to try now, in the order they were tapped: this person's, not refused, not waiting on a refused one. */
export function sendOrder(items: OutboxItem[], userId: string): OutboxItem[] {
  const mine = items.filter(i => i.userId === userId).sort((a, b) => a.seq - b.seq)
  const blocked = new Set(mine.filter(i => i.refused).map(i => i.key))
  const out: OutboxItem[] = []
  for (const item of mine) {
    if (item.refused) continue
    if (refsIn(item).some(k => blocked.has(k))) { blocked.add(item.key); continue }
    out.push(item)
  }
  return out
}

/** "3 records waiting, last tried 2 min ago" (null when nothing waits). */
export function outboxSummary(items: OutboxItem[], now: Date): string | null {
  if (!items.length) return null
  const refused = items.filter(i => i.refused).length
  const waiting = items.length - refused
  const parts: string[] = []
  if (waiting) parts.push(`${waiting} ${waiting === 1 ? 'record' : 'records'} waiting to send`)
  if (refused) parts.push(`${refused} refused by the server`)
  const tried = items.map(i => i.lastTriedAt).filter((t): t is string => !!t).sort().at(-1)
  const when = tried ? `last tried ${agoText(Date.parse(tried), now)}` : 'not tried yet'
  return `${parts.join(', ')}, ${when}`
}

export function agoText(at: number, now: Date): string {
  const s = Math.max(0, Math.round((now.getTime() - at) / 1000))
  if (s < 60) return 'just now'
  const m = Math.round(s / 60)
  if (m < 60) return `${m} min ago`
  const h = Math.round(m / 60)
  if (h < 48) return `${h} h ago`
  return `${Math.round(h / 24)} days ago`
}
