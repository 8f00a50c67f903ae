// Second factor: time-based one-time passwords (TOTP, RFC 6238) through otpauth, and one-time recovery codes.
// Pure: no database, no clock of its own (the caller passes the time), so the RFC's test vectors check it.
import { Secret, TOTP } from 'otpauth'

// What authenticator apps expect by default: SHA-1, 6 digits, 30-second steps (RFC 6238 section 4 and the Key Uri
// Format's defaults, from memory). A code is accepted in the step before and after too, for clocks a little off
// (RFC 6238 section 5.2 recommends at most one step of drift).
export const TOTP_DIGITS = 6
export const TOTP_PERIOD_SECONDS = 30
export const TOTP_WINDOW_STEPS = 1
export const TOTP_ISSUER = 'Forescent'

export interface TotpOptions { algorithm?: 'SHA1' | 'SHA256' | 'SHA512', digits?: number, period?: number }

function totp(secretBase32: string, opts: TotpOptions = {}) {
  return new TOTP({
    issuer: TOTP_ISSUER,
    secret: Secret.fromBase32(secretBase32),
    algorithm: opts.algorithm ?? 'SHA1',
    digits: opts.digits ?? TOTP_DIGITS,
    period: opts.period ?? TOTP_PERIOD_SECONDS,
  })
}

/** A new random secret of 160 bits (RFC 4226 section 4 recommends 160), in base32 as apps take it. */
export function newTotpSecret(): string {
  return new Secret({ size: 20 }).base32
}

/** The secret of raw bytes (e.g. the RFC's ASCII test keys) in base32. */
export function totpSecretFromBytes(bytes: Uint8Array): string {
  return new Secret({ buffer: bytes.slice().buffer as ArrayBuffer }).base32
}

/** The code for a moment (milliseconds since the epoch). */
export function totpCode(secretBase32: string, atMs: number, opts?: TotpOptions): string {
  return totp(secretBase32, opts).generate({ timestamp: atMs })
}

/** The time step a moment falls in (RFC 6238 section 4.2: T = floor((now - T0) / X), T0 = 0). */
export function totpStep(atMs: number, period = TOTP_PERIOD_SECONDS): number {
  return Math.floor(atMs / 1000 / period)
}

/**
 * The step whose code this is, within the window around `atMs`, or null. A step at or before `lastStep` (a code
 * already used) is refused, so a code seen over someone's shoulder cannot be replayed (RFC 6238 section 5.2).
 */
export function matchTotp(secretBase32: string, code: string, atMs: number, lastStep: number | null, opts?: TotpOptions): number | null {
  const digits = opts?.digits ?? TOTP_DIGITS
  const clean = code.replace(/\s/g, '')
  if (!new RegExp(`^\\d{${digits}}$`).test(clean)) return null
  const delta = totp(secretBase32, opts).validate({ token: clean, timestamp: atMs, window: TOTP_WINDOW_STEPS })
  if (delta === null) return null
  const step = totpStep(atMs, opts?.period) + delta
  return lastStep !== null && step <= lastStep ? null : step
}

/** The otpauth:// address an authenticator app reads from the QR code. */
export function totpUri(secretBase32: string, account: string): string {
  const t = totp(secretBase32)
  t.label = account
  return t.toString()
}

// Recovery codes: 10 codes of 10 characters from an alphabet without look-alikes (about 50 bits each; common
// practice), shown once in groups of five, stored hashed, each used once.
export const RECOVERY_CODE_COUNT = 10
const RECOVERY_ALPHABET = 'abcdefghjkmnpqrstuvwxyz23456789'

/** Codes from the given random bytes (10 bytes per code), formatted "xxxxx-xxxxx". */
export function recoveryCodesFrom(random: Uint8Array, count = RECOVERY_CODE_COUNT): string[] {
  const codes: string[] = []
  for (let i = 0; i < count; i++) {
    let s = ''
    for (let j = 0; j < 10; j++) s += RECOVERY_ALPHABET[random[i * 10 + j]! % RECOVERY_ALPHABET.length]
    codes.push(`${s.slice(0, 5)}-${s.slice(5)}`)
  }
  return codes
}

/** A typed recovery code in its stored form: lower case, no spaces or dashes. */
export function normaliseRecoveryCode(code: string): string {
  return code.toLowerCase().replace(/[\s-]/g, '')
}
