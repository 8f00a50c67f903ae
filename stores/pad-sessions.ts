import { defineStore } from 'pinia'

// Which training session is open on this device's trial pad, per client, so a reload reopens it. Only a pointer:
// the session and its trials themselves wait in the outbox (stores/outbox.ts, IndexedDB) until the server has them.

/** A session open on the pad: `key` is its record key; the server's id is learnt from the outbox once it arrives. */
export interface OpenPadSession { key: string, day: string, openedAt: string }

export const usePadSessionsStore = defineStore('pad-sessions', {
  state: () => ({ open: {} as Record<string, OpenPadSession> }),
  actions: {
    setOpen(clientId: string, session: OpenPadSession | null) {
      const others = Object.fromEntries(Object.entries(this.open).filter(([id]) => id !== clientId))
      this.open = session ? { ...others, [clientId]: session } : others
    },
  },
  persist: { pick: ['open'], storage: piniaPluginPersistedstate.localStorage() },
})
