// Slowing down guessing: failed sign-ins and password-reset requests are counted per e-mail and per network address
// (rate-limiter-flexible, in this process's memory; each app instance counts on its own). Past the limit the request
// is refused with 429, a Retry-After header and a message saying how long to wait.
import type { H3Event } from 'h3'
import { RateLimiterMemory, RateLimiterRes } from 'rate-limiter-flexible'

// Limits are our own choice, in the spirit of the OWASP Authentication Cheat Sheet's advice to throttle repeated
// failures per account without locking the account out for good ("common practice": no published figure).
const limiters = {
  signInEmail: new RateLimiterMemory({ keyPrefix: 'sign-in-email', points: 10, duration: 15 * 60 }),
  signInAddress: new RateLimiterMemory({ keyPrefix: 'sign-in-address', points: 100, duration: 15 * 60 }),
  resetEmail: new RateLimiterMemory({ keyPrefix: 'reset-email', points: 5, duration: 60 * 60 }),
  resetAddress: new RateLimiterMemory({ keyPrefix: 'reset-address', points: 30, duration: 60 * 60 }),
}

export type ThrottleName = keyof typeof limiters

/** The caller's address: the socket's, or the first X-Forwarded-For hop when TRUST_PROXY=1 (behind our own proxy). */
export function requestAddress(event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: process.env.TRUST_PROXY === '1' }) ?? 'unknown'
}

function waitText(ms: number): string {
  const minutes = Math.ceil(ms / 60_000)
  return minutes <= 1 ? 'a minute' : `${minutes} minutes`
}

function tooMany(event: H3Event, msBeforeNext: number, what: string): never {
  setResponseHeader(event, 'Retry-After', Math.max(1, Math.ceil(msBeforeNext / 1000)))
  throw createError({ statusCode: 429, statusMessage: 'Too Many Requests', message: `${what} Please wait ${waitText(msBeforeNext)} and try again.` })
}

/** Refuses with 429 when any of the counters is already used up (does not count this request). */
export async function assertNotThrottled(event: H3Event, checks: Array<[ThrottleName, string]>, what: string): Promise<void> {
  for (const [name, key] of checks) {
    const res = await limiters[name].get(key)
    if (res && res.remainingPoints <= 0) tooMany(event, res.msBeforeNext, what)
  }
}

/** Counts one attempt on each counter; refuses with 429 when this attempt goes past a limit. */
export async function countAttempt(event: H3Event, checks: Array<[ThrottleName, string]>, what: string): Promise<void> {
  for (const [name, key] of checks) {
    try {
      await limiters[name].consume(key)
    }
    catch (res) {
      if (res instanceof RateLimiterRes) tooMany(event, res.msBeforeNext, what)
      throw res
    }
  }
}

/** Forgets the failures counted for a key (after a successful sign-in). */
export async function clearAttempts(name: ThrottleName, key: string): Promise<void> {
  await limiters[name].delete(key)
}
