// Bag codes made on the phone, so a sample saved with no signal gets the code to write on its bag at once.
//
// A phone-made code is the kind's letter, the phone's own prefix and the phone's running number: T-ABC2D is prefix
// "ABC", number "2D". The prefix is reserved for this phone on the server when there is a signal (no other phone
// ever gets it), and the running number never repeats on the phone, so two phones can never make the same code, and
// a phone-made code (5 characters) can never be a server-made one (4, shared/utils/samples.ts). A phone that has
// never had a signal since it was set up uses a random prefix until it can reserve one: its codes are then very
// probably unique (1 in 29,791 per other such phone of the household), and the server refuses a real clash with a
// 409 whose fix is a new code for that bag.
import { BAG_CODE_ALPHABET, BAG_CODE_PREFIX, cryptoRandom, type RandomSource, type SampleKind } from './samples'

export const DEVICE_PREFIX_LENGTH = 3
export const DEVICE_NUMBER_LENGTH = 2
/** Codes one prefix gives (31² = 961); then the phone takes a new prefix. */
export const DEVICE_NUMBERS = BAG_CODE_ALPHABET.length ** DEVICE_NUMBER_LENGTH
/** Prefixes there are (31³ = 29,791). */
export const DEVICE_PREFIXES = BAG_CODE_ALPHABET.length ** DEVICE_PREFIX_LENGTH

/** What a phone keeps to make codes: its prefix, whether the server reserved it for this phone, the next number. */
export interface DeviceCodes { prefix: string, reserved: boolean, next: number }

const PREFIX_RE = new RegExp(`^[${BAG_CODE_ALPHABET}]{${DEVICE_PREFIX_LENGTH}}$`)
const PHONE_CODE_RE = new RegExp(`^([TC])-[${BAG_CODE_ALPHABET}]{${DEVICE_PREFIX_LENGTH + DEVICE_NUMBER_LENGTH}}$`)

export const isDevicePrefix = (value: unknown): value is string => typeof value === 'string' && PREFIX_RE.test(value)

/** True for a code made on a phone, optionally of the given kind. */
export function isPhoneBagCode(value: unknown, kind?: SampleKind): value is string {
  if (typeof value !== 'string') return false
  const m = PHONE_CODE_RE.exec(value)
  return !!m && (kind === undefined || m[1] === BAG_CODE_PREFIX[kind])
}

/** The prefix of a phone-made code ('T-ABC2D' → 'ABC'). */
export const prefixOfPhoneCode = (code: string) => code.slice(2, 2 + DEVICE_PREFIX_LENGTH)

function digits(n: number, length: number): string {
  let out = ''
  let rest = n
  for (let i = 0; i < length; i++) {
    out = BAG_CODE_ALPHABET[rest % BAG_CODE_ALPHABET.length] + out
    rest = Math.floor(rest / BAG_CODE_ALPHABET.length)
  }
  return out
}

/** The code of number `n` (0 … DEVICE_NUMBERS − 1) under `prefix`. */
export function phoneBagCode(kind: SampleKind, prefix: string, n: number): string {
  if (!isDevicePrefix(prefix)) throw new RangeError(`Not a device prefix: ${prefix}`)
  if (!Number.isInteger(n) || n < 0 || n >= DEVICE_NUMBERS) throw new RangeError(`The running number must be 0 to ${DEVICE_NUMBERS - 1}.`)
  return `${BAG_CODE_PREFIX[kind]}-${prefix}${digits(n, DEVICE_NUMBER_LENGTH)}`
}

/** A random prefix (for a phone that could not reserve one yet, and for the server choosing one to reserve). */
export function randomDevicePrefix(random: RandomSource = cryptoRandom): string {
  let out = ''
  for (let i = 0; i < DEVICE_PREFIX_LENGTH; i++) {
    const r = random()
    if (!(r >= 0 && r < 1)) throw new RangeError('The random source must return numbers from 0 up to but not including 1.')
    out += BAG_CODE_ALPHABET[Math.floor(r * BAG_CODE_ALPHABET.length)]
  }
  return out
}

/** The server's choice of a prefix nobody holds; null when (almost) all are taken. */
export function choosePrefix(taken: ReadonlySet<string>, random: RandomSource = cryptoRandom, tries = 200): string | null {
  if (taken.size >= DEVICE_PREFIXES) return null
  for (let i = 0; i < tries; i++) {
    const p = randomDevicePrefix(random)
    if (!taken.has(p)) return p
  }
  // Nearly full: the first free one in order.
  for (let n = 0; n < DEVICE_PREFIXES; n++) {
    const p = digits(n, DEVICE_PREFIX_LENGTH)
    if (!taken.has(p)) return p
  }
  return null
}

/**
 * The phone's next code and what it keeps afterwards. `fresh` gives a new prefix (a random one with no signal) when
 * there is none yet or the current one has given all its numbers.
 */
export function takePhoneCode(state: DeviceCodes | null | undefined, kind: SampleKind, fresh: () => DeviceCodes): { code: string, state: DeviceCodes } {
  let s = state && isDevicePrefix(state.prefix) && Number.isInteger(state.next) && state.next >= 0 ? state : null
  if (!s || s.next >= DEVICE_NUMBERS) s = fresh()
  return { code: phoneBagCode(kind, s.prefix, s.next), state: { ...s, next: s.next + 1 } }
}

/** Whether the phone should reserve a prefix now (with a signal): none reserved yet, or the current one nearly used. */
export const needsReservation = (state: DeviceCodes | null | undefined) => !state || !state.reserved || state.next >= DEVICE_NUMBERS - 20
