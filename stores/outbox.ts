import { defineStore } from 'pinia'
import { createStore, del, entries, set, type UseStore } from 'idb-keyval'
import { classifyAnswer, dependentsOf, outboxSummary, sendOrder, resolveRefs, type OutboxItem, type OutboxMethod } from '~/shared/utils/outbox'
import { REQUEST_KEY_HEADER, TAPPED_AT_HEADER } from '~/shared/utils/request-keys'

// One outbox for every record made on the phone (diary entries and their edits, training sessions and their trials,
// …), kept in IndexedDB so a reload, a closed tab, no signal or an expired session loses nothing. Each record is
// sent with its own key (Idempotency-Key) and the moment of the tap (X-Tapped-At): the server makes it once,
// however often it is sent. Records go only while the person who made them is signed in.

let itemsDb: UseStore | undefined
let idsDb: UseStore | undefined
function stores() {
  // Two databases, as idb-keyval keeps one object store per database.
  itemsDb ??= createStore('forescent-outbox', 'items')
  idsDb ??= createStore('forescent-outbox-ids', 'ids')
  return { itemsDb, idsDb }
}
/** Ids the server gave to sent records are kept this long, for records that still name them (common practice). */
const ID_KEEP_MS = 14 * 86_400_000

/** A send with no answer after this long is tried again later (a weak signal; common practice). */
const SEND_TIMEOUT_MS = 20_000

export interface NewRecord { key?: string, label: string, method: OutboxMethod, url: string, body?: unknown, tappedAt?: string, href?: string }
export interface SentRecord { key: string, result: unknown }

const statusOf = (e: unknown) => (e as { statusCode?: number, status?: number }).statusCode ?? (e as { status?: number }).status
const dataOf = (e: unknown) => (e as { data?: { data?: unknown } }).data?.data
const rulesOf = (d: unknown) => {
  const x = d as { rules?: unknown, fieldErrors?: unknown } | null | undefined
  return {
    ...(Array.isArray(x?.rules) ? { rules: x.rules.map(String) } : {}),
    ...(x?.fieldErrors && typeof x.fieldErrors === 'object' ? { fieldErrors: x.fieldErrors as Record<string, string> } : {}),
  }
}

let flushing: Promise<void> | null = null
let seq = Date.now()

export const useOutboxStore = defineStore('outbox', {
  state: () => ({
    items: [] as OutboxItem[],
    /** Server ids of sent records, by their key, with when they were learnt. */
    ids: {} as Record<string, { id: string, at: number }>,
    loaded: false,
    /** The signed-in person (kept by plugins/outbox.client.ts): only their records are sent. */
    userId: null as string | null,
    /** Answers of records sent since the page opened, by key (screens pick up the server's row from here). */
    sent: {} as Record<string, unknown>,
    lastError: '' as string,
  }),
  getters: {
    summary: state => (now: Date) => outboxSummary(state.items, now),
    waiting: state => (key: string) => state.items.some(i => i.key === key),
    idOf: state => (key: string) => state.ids[key]?.id ?? null,
  },
  actions: {
    async load() {
      if (this.loaded || !import.meta.client) return
      const { itemsDb, idsDb } = stores()
      try {
        const [items, ids] = await Promise.all([entries<string, OutboxItem>(itemsDb), entries<string, { id: string, at: number }>(idsDb)])
        this.items = items.map(([, v]) => v).sort((a, b) => a.seq - b.seq)
        const fresh = ids.filter(([, v]) => Date.now() - v.at < ID_KEEP_MS)
        this.ids = Object.fromEntries(fresh)
        for (const [k] of ids.filter(([, v]) => Date.now() - v.at >= ID_KEEP_MS)) await del(k, idsDb)
        seq = Math.max(seq, ...this.items.map(i => i.seq + 1))
      }
      catch {
        this.lastError = 'This browser cannot keep records offline (private mode?). Records are sent at once and are lost without a signal.'
      }
      this.loaded = true
    },
    /** Keeps a new record on the phone (first) and returns its key; send() then tries to deliver it. */
    async add(record: NewRecord): Promise<OutboxItem> {
      await this.load()
      const userId = this.userId
      if (!userId) throw new Error('Sign in to record this.')
      const now = new Date().toISOString()
      const item: OutboxItem = {
        key: record.key ?? crypto.randomUUID(), userId, label: record.label, method: record.method, url: record.url,
        // As it will travel (dates as ISO strings), so what waits is exactly what is sent.
        body: record.body === undefined ? undefined : JSON.parse(JSON.stringify(record.body)), tappedAt: record.tappedAt ?? now, queuedAt: now, seq: seq++, attempts: 0,
        ...(record.href ? { href: record.href } : {}),
      }
      await this.save(item)
      this.items = [...this.items, item]
      return item
    },
    async save(item: OutboxItem) {
      try { await set(item.key, JSON.parse(JSON.stringify(item)), stores().itemsDb) }
      catch { /* IndexedDB unavailable: the record still waits in memory for this page's life */ }
    },
    async remove(key: string) {
      this.items = this.items.filter(i => i.key !== key)
      try { await del(key, stores().itemsDb) }
      catch { /* see save() */ }
    },
    /** Changes a waiting record's body (the person fixes a refused one, or edits one not sent yet). */
    async update(key: string, body: unknown, label?: string) {
      const item = this.items.find(i => i.key === key)
      if (!item) return
      const next = { ...item, body, refused: undefined, ...(label ? { label } : {}) }
      this.items = this.items.map(i => (i.key === key ? next : i))
      await this.save(next)
    },
    /** Discards a record and the records that need it (they could never be sent without it). */
    async discard(key: string) {
      for (const k of dependentsOf(this.items, key)) await this.remove(k)
      await this.remove(key)
    },
    /** How many waiting records need this one (said before discarding it). */
    dependents(key: string): number {
      return dependentsOf(this.items, key).length
    },
    /** The server's id for a record sent earlier, learnt another way (a record moved from the old trial queue). */
    async learnId(key: string, id: string) {
      this.ids = { ...this.ids, [key]: { id, at: Date.now() } }
      try { await set(key, { id, at: Date.now() }, stores().idsDb) }
      catch { /* see save() */ }
    },
    async retry(key: string) {
      const item = this.items.find(i => i.key === key)
      if (!item) return
      const next = { ...item, refused: undefined }
      this.items = this.items.map(i => (i.key === key ? next : i))
      await this.save(next)
      await this.send()
    },
    /** Sends what waits, oldest first, for the signed-in person; stops at the first that cannot go now. */
    send(): Promise<void> {
      flushing ??= this.sendAll().finally(() => { flushing = null })
      return flushing
    },
    async sendAll() {
      await this.load()
      const userId = this.userId
      if (!userId) return
      const ids = Object.fromEntries(Object.entries(this.ids).map(([k, v]) => [k, v.id]))
      for (const item of sendOrder(this.items, userId)) {
        const url = resolveRefs(item.url, ids)
        const body = resolveRefs(item.body, ids)
        if (url === null || (item.body !== undefined && body === null)) continue // waits for an earlier record
        const tried = { ...item, attempts: item.attempts + 1, lastTriedAt: new Date().toISOString() }
        let kind: 'sent' | 'retry' | 'refused'
        let result: unknown = null
        let message = ''
        let status: number | undefined
        let details = {}
        try {
          result = await $fetch<unknown>(url as string, {
            method: item.method, body: item.method === 'DELETE' ? undefined : (body as Record<string, unknown>),
            headers: { [REQUEST_KEY_HEADER]: item.key, [TAPPED_AT_HEADER]: item.tappedAt },
            timeout: SEND_TIMEOUT_MS,
          })
          kind = 'sent'
        }
        catch (e) {
          status = statusOf(e)
          kind = classifyAnswer(status, item.method, dataOf(e))
          message = apiErrorMessage(e, 'The server refused this record.')
          details = rulesOf(dataOf(e))
        }
        if (kind === 'retry') {
          this.items = this.items.map(i => (i.key === item.key ? tried : i))
          await this.save(tried)
          this.lastError = status === 401 ? 'Sign in again to send the records waiting on this phone.' : ''
          return
        }
        if (kind === 'refused') {
          const refused = { ...tried, refused: { status: status ?? 0, message, ...details } }
          this.items = this.items.map(i => (i.key === item.key ? refused : i))
          await this.save(refused)
          continue
        }
        const id = (result as { id?: string, use?: { id?: string }, sample?: { id?: string } } | null)
        const serverId = id?.id ?? id?.use?.id ?? id?.sample?.id
        if (serverId) {
          ids[item.key] = serverId
          this.ids = { ...this.ids, [item.key]: { id: serverId, at: Date.now() } }
          try { await set(item.key, { id: serverId, at: Date.now() }, stores().idsDb) }
          catch { /* see save() */ }
        }
        this.sent = { ...this.sent, [item.key]: result }
        this.lastError = ''
        await this.remove(item.key)
      }
    },
  },
})
