import { useOutboxStore } from '~/stores/outbox'

// Sends the records waiting on this phone when the app starts, when the signal returns, when the page comes back
// into view, and every so often while some wait.
const RETRY_EVERY_MS = 5_000 // cheap: with no signal at all the phone says so and nothing is tried

export default defineNuxtPlugin((nuxtApp) => {
  const outbox = useOutboxStore(nuxtApp.$pinia as never)
  const send = () => { if (navigator.onLine !== false) void outbox.send() }
  // Records go only while the person who made them is signed in; a new sign-in of that person sends them.
  const { user } = useUserSession()
  watch(() => user.value?.id ?? null, (id) => {
    outbox.userId = id
    if (id) send()
  }, { immediate: true })
  nuxtApp.hook('app:mounted', async () => {
    await outbox.load()
    send()
  })
  window.addEventListener('online', send)
  document.addEventListener('visibilitychange', () => { if (document.visibilityState === 'visible') send() })
  setInterval(() => { if (outbox.items.some(i => !i.refused)) send() }, RETRY_EVERY_MS)
})
