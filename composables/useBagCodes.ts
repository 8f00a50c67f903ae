import { createStore, get, update, type UseStore } from 'idb-keyval'
import { needsReservation, randomDevicePrefix, takePhoneCode, type DeviceCodes } from '~/shared/utils/bag-codes'
import type { SampleKind } from '~/shared/utils/samples'

// Bag codes made on this phone (shared/utils/bag-codes.ts): the phone's prefix and running number are kept in
// IndexedDB, so a sample saved with no signal gets the code for its bag at once, and it never repeats.
let deviceDb: UseStore | undefined
const db = () => (deviceDb ??= createStore('forescent-device', 'settings'))
const KEY = 'bag-codes'

/** Codes made while IndexedDB cannot be used (private mode): kept for this page's life only. */
let memory: DeviceCodes | null = null
const unreserved = (): DeviceCodes => ({ prefix: randomDevicePrefix(), reserved: false, next: 0 })

/** The next code for a bag of this kind, made on the phone (no signal needed). */
export async function nextBagCode(kind: SampleKind): Promise<string> {
  let code = ''
  try {
    await update<DeviceCodes>(KEY, (state) => {
      const out = takePhoneCode(state, kind, unreserved)
      code = out.code
      return out.state
    }, db())
  }
  catch {
    const out = takePhoneCode(memory, kind, unreserved)
    memory = out.state
    code = out.code
  }
  return code
}

/**
 * With a signal, reserves a prefix for this phone on the server when it has none yet (or only a random one, or one
 * nearly used up). Quietly does nothing with no signal: codes are still made, with the random prefix.
 */
export async function reservePhonePrefix(): Promise<void> {
  if (typeof navigator !== 'undefined' && navigator.onLine === false) return
  try {
    if (!needsReservation(await get<DeviceCodes>(KEY, db()))) return
    const { prefix } = await $fetch<{ prefix: string }>('/api/bag-code-prefixes', { method: 'POST', body: {}, headers: { 'idempotency-key': crypto.randomUUID() } })
    await update<DeviceCodes>(KEY, state => (needsReservation(state) ? { prefix, reserved: true, next: 0 } : state!), db())
  }
  catch { /* no signal or no storage: tried again next time */ }
}
