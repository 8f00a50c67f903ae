import { createHash, randomBytes } from 'node:crypto'

/** A URL-safe single-use secret; only its SHA-256 is stored, so a database copy cannot be replayed. */
export function newToken(): { token: string, hash: string } {
  const token = randomBytes(32).toString('base64url')
  return { token, hash: hashToken(token) }
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex')
}

/**
 * Stands for a single-use link's token in a queued e-mail; the outbox mints the real token when it sends the message
 * (server/services/outbox.ts), so no copy of the database ever holds a usable link.
 */
export const SECRET_LINK_TOKEN = '{{secret-link-token}}'

// Link lifetimes (common practice): invitations a week, password resets one hour.
export const INVITATION_TTL_MS = 7 * 24 * 60 * 60 * 1000
export const PASSWORD_RESET_TTL_MS = 60 * 60 * 1000

export function appUrl(path: string): string {
  const base = (process.env.APP_URL || useRuntimeConfig().appUrl || 'http://localhost:3000').replace(/\/$/, '')
  return `${base}${path}`
}
