import type { H3Event } from 'h3'
import { RateLimiterMemory, RateLimiterRes } from 'rate-limiter-flexible'

// Slowing down guessing without letting a stranger lock the owner out: failed sign-ins are counted per account AND
// address (a stranger's failures never block the owner's own address), with a slower per-account limit over a day
// that only many addresses together can reach, and a per-address limit against guessing across many accounts.
// Reset requests are counted per e-mail and per address. In this process's memory (rate-limiter-flexible); each app
// instance counts on its own. Past a limit the request is refused with 429, Retry-After and how long to wait.
// The figures (docs/security.md "Throttling"):
// - 10 failed sign-ins per account and address in 15 minutes (our choice, in the spirit of the OWASP Authentication
//   Cheat Sheet's advice to throttle repeated failures without locking accounts for good: common practice);
// - 100 failed sign-ins per account in 24 hours from all addresses together (NIST SP 800-63B section 5.2.2: no more
//   than 100 consecutive failed attempts on one account); a successful sign-in clears both;
// - 100 failed sign-ins per address in 15 minutes, any accounts (common practice);
// - 5 reset requests per e-mail and 30 per address in an hour (common practice).
const limiters = {
  signInAccountAddress: new RateLimiterMemory({ keyPrefix: 'sign-in-account-address', points: 10, duration: 15 * 60 }),
  signInAccount: new RateLimiterMemory({ keyPrefix: 'sign-in-account', points: 100, duration: 24 * 60 * 60 }),
  signInAddress: new RateLimiterMemory({ keyPrefix: 'sign-in-address', points: 100, duration: 15 * 60 }),
  resetEmail: new RateLimiterMemory({ keyPrefix: 'reset-email', points: 5, duration: 60 * 60 }),
  resetAddress: new RateLimiterMemory({ keyPrefix: 'reset-address', points: 30, duration: 60 * 60 }),
}

export type ThrottleName = keyof typeof limiters

/** The caller's address: the socket's, or the first X-Forwarded-For hop when TRUST_PROXY=1 (behind our own proxy). */
export function requestAddress(event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: trustProxy() }) ?? 'unknown'
}

function waitText(ms: number): string {
  const minutes = Math.ceil(ms / 60_000)
  return minutes <= 1 ? 'a minute' : `${minutes} minutes`
}

function tooMany(event: H3Event, msBeforeNext: number, what: string, counter: ThrottleName): never {
  logEvent('auth.throttled', { counter, retryAfterSeconds: Math.ceil(msBeforeNext / 1000) }, 'warn', event)
  setResponseHeader(event, 'Retry-After', Math.max(1, Math.ceil(msBeforeNext / 1000)))
  throw createError({ statusCode: 429, statusMessage: 'Too Many Requests', message: `${what} Please wait ${waitText(msBeforeNext)} and try again.` })
}

/** Refuses with 429 when any of the counters is already used up (does not count this request). */
export async function assertNotThrottled(event: H3Event, checks: Array<[ThrottleName, string]>, what: string): Promise<void> {
  for (const [name, key] of checks) {
    const res = await limiters[name].get(key)
    if (res && res.remainingPoints <= 0) tooMany(event, res.msBeforeNext, what, name)
  }
}

/** Counts one attempt on each counter; refuses with 429 when this attempt goes past a limit. */
export async function countAttempt(event: H3Event, checks: Array<[ThrottleName, string]>, what: string): Promise<void> {
  for (const [name, key] of checks) {
    try {
      await limiters[name].consume(key)
    }
    catch (res) {
      if (res instanceof RateLimiterRes) tooMany(event, res.msBeforeNext, what, name)
      throw res
    }
  }
}

/** Forgets the failures counted for these keys (after a successful sign-in). */
export async function clearAttempts(checks: Array<[ThrottleName, string]>): Promise<void> {
  for (const [name, key] of checks) await limiters[name].delete(key)
}

/** The counters a sign-in attempt for this e-mail from this request's address goes on. */
export function signInCounters(event: H3Event, email: string): Array<[ThrottleName, string]> {
  const account = email.toLowerCase()
  const address = requestAddress(event)
  return [['signInAccountAddress', `${account} ${address}`], ['signInAccount', account], ['signInAddress', address]]
}
