import { eq } from 'drizzle-orm'
import { databaseReady } from '../plugins/database'
import { users } from '../database/schema'

// Refresh the idle timer at most this often, so the sealed cookie is not rewritten on every request.
const SEEN_REFRESH_MS = 5 * 60 * 1000

/**
 * Loads the signed-in user for every request and checks the sealed cookie against the database:
 * a raised session version (sign-out, password change, disabling), a disabled account, or an idle or
 * absolute expiry ends the session at once.
 */
export default defineEventHandler(async (event) => {
  await databaseReady()
  const path = event.path
  if (!path.startsWith('/api/') && !isPagePath(path)) return
  // No cookie, no session: don't let getUserSession() mint an empty one for anonymous requests.
  if (!getCookie(event, useRuntimeConfig().session.name || 'nuxt-session')) return
  const session = await getUserSession(event)
  if (!session.user?.id) return
  const rc = useRuntimeConfig()
  const now = Date.now()
  const idleMs = Number(rc.sessionIdleSeconds) * 1000
  const absoluteMs = Number(rc.sessionAbsoluteSeconds) * 1000
  const [row] = await useDb().select({
    id: users.id, role: users.role, name: users.name, email: users.email, timeZone: users.timeZone,
    disabledAt: users.disabledAt, sessionVersion: users.sessionVersion, totpEnabledAt: users.totpEnabledAt,
  }).from(users).where(eq(users.id, session.user.id)).limit(1)
  const expired = !session.issuedAt || now - session.issuedAt > absoluteMs || !session.seenAt || now - session.seenAt > idleMs
  if (!row || row.disabledAt || row.sessionVersion !== session.sv || expired) {
    await clearUserSession(event)
    return
  }
  event.context.authUser = { id: row.id, role: row.role, name: row.name, email: row.email, timeZone: row.timeZone }
  // Staff without a second factor while the office requires one may only set it up (requireUser enforces it).
  if (row.role !== 'handler' && !row.totpEnabledAt) event.context.mustEnrolSecondFactor = await mustEnrolSecondFactor(row)
  // Refresh often enough that an active person is never timed out (a quarter of the idle limit at most).
  if (now - (session.seenAt ?? 0) > Math.min(SEEN_REFRESH_MS, idleMs / 4) || row.role !== session.user.role || row.name !== session.user.name) {
    await replaceUserSession(event, { ...session, user: event.context.authUser, seenAt: now }, sessionCookieConfig())
  }
})

function isPagePath(path: string) {
  return !path.startsWith('/_nuxt/') && !path.startsWith('/__nuxt') && !/\.[a-z0-9]+(\?|$)/i.test(path)
}
