// When a sample has been out of the freezer for the policy's limit, the phone says so: a notification with
// vibration where the person allowed notifications (Notification API, shown through the service worker so it also
// appears with the page in the background), and always the on-screen alarm (`due`), the fallback.
// Background tabs run timers late (Chrome runs them at most once a minute after a few minutes hidden, from memory),
// so a notification in the background can come up to about a minute late; the on-screen timer is exact.

// A long-short-long buzz (our own pattern).
const VIBRATION = [400, 150, 400, 150, 400]

export function useSampleOutAlarm() {
  const due = ref(false)
  const permission = ref<NotificationPermission | 'unsupported'>('unsupported')
  let timer: ReturnType<typeof setTimeout> | undefined

  async function ask() {
    if (!('Notification' in window)) return
    if (Notification.permission === 'default') {
      // Some browsers never answer when the prompt is dismissed: stop waiting after a few seconds.
      try { await Promise.race([Notification.requestPermission(), new Promise(r => setTimeout(r, 3000))]) }
      catch { /* refused or not allowed here: the screen shows the alarm */ }
    }
    permission.value = Notification.permission
  }

  async function ring(bagCode: string, minutes: number) {
    due.value = true
    navigator.vibrate?.(VIBRATION)
    if (!('Notification' in window) || Notification.permission !== 'granted') return
    const title = `Sample ${bagCode}: ${minutes} minutes out`
    const options: NotificationOptions & { vibrate?: number[] } = { body: 'Put it back in the freezer now.', tag: `sample-out-${bagCode}`, icon: '/icon-192.png', vibrate: VIBRATION, requireInteraction: true }
    try {
      const reg = await navigator.serviceWorker?.getRegistration()
      if (reg) await reg.showNotification(title, options)
      else new Notification(title, options)
    }
    catch { /* the on-screen alarm stays */ }
  }

  /** Sets the alarm for a sample taken out at `outAt`. */
  function arm(outAt: string, minutes: number, bagCode: string) {
    disarm()
    if ('Notification' in window) permission.value = Notification.permission
    const wait = Date.parse(outAt) + minutes * 60_000 - Date.now()
    due.value = wait <= 0
    if (wait > 0) timer = setTimeout(() => ring(bagCode, minutes), wait)
  }
  function disarm() {
    clearTimeout(timer)
    timer = undefined
    due.value = false
  }
  onBeforeUnmount(disarm)
  return { due, permission, ask, arm, disarm }
}
