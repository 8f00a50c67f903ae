import { defineStore } from 'pinia'

// Trials tapped on the training ground wait here until the server has them, kept in this browser's localStorage so
// a reload, a closed tab or a lost signal loses nothing. Each trial carries a key made on the device (entryKey): the
// server stores a trial sent twice only once and answers 200 with the stored row. A trial undone before it reached
// the server is still sent, then deleted, so an earlier send whose answer was lost cannot leave it behind.

export interface QueuedTrial {
  entryKey: string
  sessionId: string
  clientId: string
  stations: number
  targetStation: number | null
  indicatedStation: number | null
  /** Undone on the pad: delete it once the server has it. */
  undo?: boolean
  queuedAt: string
}

export type SendOutcome =
  | { entryKey: string, kind: 'stored', id: string }
  | { entryKey: string, kind: 'undone' }
  | { entryKey: string, kind: 'refused', message: string }

/** A session open on the pad, so it comes back after a reload. */
export interface OpenPadSession { sessionId: string, day: string, openedAt: string }

const statusOf = (e: unknown) => (e as { statusCode?: number, status?: number }).statusCode ?? (e as { status?: number }).status

// Answers that mean "try again later" rather than "this trial is wrong".
const retryable = (status: number | undefined) => !status || status >= 500 || status === 401 || status === 408 || status === 429

export const useTrialQueueStore = defineStore('trial-queue', {
  state: () => ({ queue: [] as QueuedTrial[], open: {} as Record<string, OpenPadSession> }),
  getters: {
    pendingFor: state => (sessionId: string) => state.queue.filter(q => q.sessionId === sessionId),
  },
  actions: {
    enqueue(trial: Omit<QueuedTrial, 'queuedAt'>) {
      if (this.queue.some(q => q.entryKey === trial.entryKey)) return
      this.queue = [...this.queue, { ...trial, queuedAt: new Date().toISOString() }]
    },
    markUndone(entryKey: string) {
      this.queue = this.queue.map(q => (q.entryKey === entryKey ? { ...q, undo: true } : q))
    },
    drop(entryKey: string) {
      this.queue = this.queue.filter(q => q.entryKey !== entryKey)
    },
    setOpen(clientId: string, session: OpenPadSession | null) {
      const next = { ...this.open }
      if (session) next[clientId] = session
      else delete next[clientId]
      this.open = next
    },
    /**
     * Sends every queued trial, oldest first; stops at the first that cannot be sent now (no signal, server down),
     * keeping it and the ones after it. Returns what happened to each trial that left the queue.
     */
    async flush(): Promise<{ outcomes: SendOutcome[], stalled: boolean }> {
      const outcomes: SendOutcome[] = []
      if (flushing) return { outcomes, stalled: false }
      flushing = true
      try {
        for (const item of [...this.queue]) {
          try {
            const row = await $fetch<{ id: string }>(`/api/training-sessions/${item.sessionId}/trials`, {
              method: 'POST',
              body: { stations: item.stations, targetStation: item.targetStation, indicatedStation: item.indicatedStation, entryKey: item.entryKey },
            })
            if (item.undo) {
              try { await $fetch(`/api/training-trials/${row.id}`, { method: 'DELETE' }) }
              catch (e) { if (statusOf(e) !== 404) throw e }
              outcomes.push({ entryKey: item.entryKey, kind: 'undone' })
            }
            else outcomes.push({ entryKey: item.entryKey, kind: 'stored', id: row.id })
            this.drop(item.entryKey)
          }
          catch (e) {
            const status = statusOf(e)
            if (retryable(status)) return { outcomes, stalled: true }
            // The server refused this trial (e.g. its session was removed): it will never go through.
            this.drop(item.entryKey)
            outcomes.push({ entryKey: item.entryKey, kind: item.undo ? 'undone' : 'refused', message: apiErrorMessage(e, 'That trial was refused.') })
          }
        }
        return { outcomes, stalled: false }
      }
      finally { flushing = false }
    },
  },
  persist: { pick: ['queue', 'open'], storage: piniaPluginPersistedstate.localStorage() },
})

let flushing = false
