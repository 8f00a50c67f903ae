import { useOutboxStore } from '~/stores/outbox'
import { usePadSessionsStore } from '~/stores/pad-sessions'
import { LEGACY_TRIAL_QUEUE_KEY, moveLegacyTrialQueue } from '~/shared/utils/outbox'

// Sends the records waiting on this phone when the app starts, when the signal returns, when the page comes back
// into view, and every so often while some wait.
const RETRY_EVERY_MS = 5_000 // cheap: with no signal at all the phone says so and nothing is tried

export default defineNuxtPlugin((nuxtApp) => {
  const outbox = useOutboxStore(nuxtApp.$pinia as never)
  const send = () => { if (navigator.onLine !== false) void outbox.send() }
  // Once: trials an earlier version of the app kept in localStorage go onto the outbox (as the signed-in person's),
  // then the old queue is removed. Their entry keys make them arrive once, whatever was sent before.
  let moving: Promise<void> | null = null
  function moveLegacyQueue() {
    moving ??= (async () => {
      let raw: string | null = null
      try { raw = localStorage.getItem(LEGACY_TRIAL_QUEUE_KEY) }
      catch { return }
      if (raw === null) return
      const moved = moveLegacyTrialQueue(raw)
      await outbox.load()
      for (const r of moved.records) if (!outbox.items.some(i => i.key === r.key)) await outbox.add(r)
      const pads = usePadSessionsStore(nuxtApp.$pinia as never)
      for (const [clientId, o] of Object.entries(moved.open)) {
        await outbox.learnId(o.key, o.sessionId)
        if (!pads.open[clientId]) pads.setOpen(clientId, { key: o.key, day: o.day, openedAt: o.openedAt })
      }
      localStorage.removeItem(LEGACY_TRIAL_QUEUE_KEY)
    })().catch(() => { moving = null })
    return moving
  }

  // Records go only while the person who made them is signed in; a new sign-in of that person sends them.
  const { user } = useUserSession()
  watch(() => user.value?.id ?? null, async (id) => {
    outbox.userId = id
    if (id) { await moveLegacyQueue(); send() }
  }, { immediate: true })

  nuxtApp.hook('app:mounted', async () => {
    await outbox.load()
    send()
  })
  window.addEventListener('online', send)
  document.addEventListener('visibilitychange', () => { if (document.visibilityState === 'visible') send() })
  setInterval(() => { if (outbox.items.some(i => !i.refused)) send() }, RETRY_EVERY_MS)
})
