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
  /** The server refused it: kept with the reason (and the rules it named) until the person fixes or discards it. */
  refused?: { status: number, message: string, rules?: string[], fieldErrors?: Record<string, string> }
  /** The page where the record can be seen and fixed ("Open" beside a refusal). */
  href?: string
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

/** The records that need `key` (directly or through another), which cannot go without it. */
export function dependentsOf(items: Pick<OutboxItem, 'key' | 'url' | 'body'>[], key: string): string[] {
  const out = new Set<string>()
  let frontier = [key]
  while (frontier.length) {
    const next: string[] = []
    for (const item of items) {
      if (out.has(item.key) || item.key === key) continue
      if (refsIn(item).some(k => frontier.includes(k))) { out.add(item.key); next.push(item.key) }
    }
    frontier = next
  }
  return [...out]
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

// ---------------------------------------------------------------------------------------------------------------
// The old trial queue (before the outbox): trials kept in localStorage under "trial-queue" by an earlier version of
// the app. Moved onto the outbox once, on app start, so nothing a phone still holds from then is lost.

export const LEGACY_TRIAL_QUEUE_KEY = 'trial-queue'

export interface LegacyRecord { key: string, label: string, method: OutboxMethod, url: string, body?: unknown, tappedAt?: string }
export interface LegacyMove {
  records: LegacyRecord[]
  /** Sessions that were open on the pad, by client: a key standing for the session, and its server id. */
  open: Record<string, { key: string, sessionId: string, day: string, openedAt: string }>
}

const KEY_RE = /^[\w-]{16,100}$/
const ID_RE = /^[\w-]{1,100}$/
const intOrNull = (v: unknown) => (v === null ? null : Number.isInteger(v) ? v as number : undefined)

/**
 * The records to add to the outbox for what the old queue held (its JSON as kept in localStorage): each trial sent
 * to its session with its own entry key (the server stores it once, whatever was sent before), an undone trial sent
 * and then removed. Anything unreadable is left out; nothing else is guessed.
 */
export function moveLegacyTrialQueue(raw: string | null | undefined): LegacyMove {
  const out: LegacyMove = { records: [], open: {} }
  if (!raw) return out
  let state: { queue?: unknown, open?: unknown }
  try { state = JSON.parse(raw) }
  catch { return out }
  const queue = Array.isArray(state?.queue) ? state.queue : []
  for (const q of queue as Record<string, unknown>[]) {
    const entryKey = q?.entryKey
    const sessionId = q?.sessionId
    const stations = q?.stations
    const targetStation = intOrNull(q?.targetStation)
    const indicatedStation = intOrNull(q?.indicatedStation)
    if (typeof entryKey !== 'string' || !KEY_RE.test(entryKey) || typeof sessionId !== 'string' || !ID_RE.test(sessionId)) continue
    if (!Number.isInteger(stations) || targetStation === undefined || indicatedStation === undefined) continue
    const tappedAt = typeof q.queuedAt === 'string' && !Number.isNaN(Date.parse(q.queuedAt)) ? new Date(q.queuedAt).toISOString() : undefined
    out.records.push({
      key: entryKey, label: 'Trial kept by an earlier version of the app', method: 'POST', url: `/api/training-sessions/${sessionId}/trials`,
      body: { stations, targetStation, indicatedStation, entryKey }, ...(tappedAt ? { tappedAt } : {}),
    })
    if (q.undo === true) {
      out.records.push({ key: `${entryKey}-undo`.slice(0, 100), label: 'Undo of a trial kept by an earlier version of the app', method: 'DELETE', url: `/api/training-trials/${refTo(entryKey)}`, ...(tappedAt ? { tappedAt } : {}) })
    }
  }
  const open = state?.open && typeof state.open === 'object' ? state.open as Record<string, Record<string, unknown>> : {}
  for (const [clientId, o] of Object.entries(open)) {
    if (!ID_RE.test(clientId) || typeof o?.sessionId !== 'string' || !ID_RE.test(o.sessionId) || typeof o.day !== 'string' || typeof o.openedAt !== 'string') continue
    out.open[clientId] = { key: `legacy-session-${o.sessionId}`.slice(0, 100), sessionId: o.sessionId, day: o.day, openedAt: o.openedAt }
  }
  return out
}
