// A moment the phone must tell the person about (a sample out of the freezer for its limit, the wait before
// collecting over): a notification with vibration where the person allowed notifications (Notification API, shown
// through the service worker so it also appears with the page in the background), and always the on-screen notice
// (`due`), the fallback. Background tabs run timers late (Chrome runs them at most once a minute after a few minutes
// hidden, from memory), so a notification in the background can come up to about a minute late; the screen is exact.

// A long-short-long buzz (our own pattern).
const NOTICE_VIBRATION = [400, 150, 400, 150, 400]

export interface TimedNotice {
  title: string
  body: string
  tag: string
}

export function useTimedNotice() {
  const due = ref(false)
  const permission = ref<NotificationPermission | 'unsupported'>('unsupported')
  let timer: ReturnType<typeof setTimeout> | undefined

  /** Asks for permission to notify (once; the answer is kept by the browser). */
  async function ask() {
    if (!('Notification' in window)) return
    if (Notification.permission === 'default') {
      // Some browsers never answer when the prompt is dismissed: stop waiting after a few seconds.
      try { await Promise.race([Notification.requestPermission(), new Promise(r => setTimeout(r, 3000))]) }
      catch { /* refused or not allowed here: the screen shows the notice */ }
    }
    permission.value = Notification.permission
  }

  async function ring(notice: TimedNotice) {
    due.value = true
    navigator.vibrate?.(NOTICE_VIBRATION)
    if (!('Notification' in window) || Notification.permission !== 'granted') return
    const options: NotificationOptions & { vibrate?: number[] } = { body: notice.body, tag: notice.tag, icon: '/icon-192.png', vibrate: NOTICE_VIBRATION, requireInteraction: true }
    try {
      const reg = await navigator.serviceWorker?.getRegistration()
      if (reg) await reg.showNotification(notice.title, options)
      else new Notification(notice.title, options)
    }
    catch { /* the on-screen notice stays */ }
  }

  /** Rings at `at` (milliseconds since the epoch); at once on screen when it has already passed. */
  function arm(at: number, notice: TimedNotice) {
    disarm()
    if ('Notification' in window) permission.value = Notification.permission
    const wait = at - Date.now()
    due.value = wait <= 0
    if (wait > 0) timer = setTimeout(() => ring(notice), wait)
  }
  function disarm() {
    clearTimeout(timer)
    timer = undefined
    due.value = false
  }
  onBeforeUnmount(disarm)
  return { due, permission, ask, arm, disarm }
}
