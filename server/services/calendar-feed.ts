// Each person's private calendar feed: a URL holding a random key and its HMAC under the server's secret (so the
// database alone cannot forge one), renewable (the old URL then answers 404), listing only that person's visits.
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto'
import { and, eq, gte, isNull } from 'drizzle-orm'
import { appointments, calendarFeeds, users } from '../database/schema'
import type { AuthUser } from '../utils/authz'

function feedSecret(): string {
  const secret = process.env.NUXT_SESSION_PASSWORD || (useRuntimeConfig().session as { password?: string } | undefined)?.password
  if (!secret) throw createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'Calendar feeds need the server secret (NUXT_SESSION_PASSWORD) to be set.' })
  return secret
}
const sign = (feedKey: string) => createHmac('sha256', feedSecret()).update(`calendar-feed:${feedKey}`).digest('base64url')

function feedUrlOf(feedKey: string) {
  return appUrl(`/api/calendar/feeds/${feedKey}.${sign(feedKey)}.ics`)
}

export async function calendarFeedUrl(user: AuthUser): Promise<string> {
  const db = useDb()
  const [row] = await db.select().from(calendarFeeds).where(eq(calendarFeeds.userId, user.id)).limit(1)
  if (row) return feedUrlOf(row.feedKey)
  const feedKey = randomBytes(16).toString('base64url')
  await db.insert(calendarFeeds).values({ userId: user.id, feedKey }).onConflictDoNothing()
  const [again] = await db.select().from(calendarFeeds).where(eq(calendarFeeds.userId, user.id)).limit(1)
  return feedUrlOf(again!.feedKey)
}

export async function renewCalendarFeed(user: AuthUser): Promise<string> {
  const feedKey = randomBytes(16).toString('base64url')
  await useDb().transaction(async (tx) => {
    await tx.insert(calendarFeeds).values({ userId: user.id, feedKey }).onConflictDoUpdate({ target: calendarFeeds.userId, set: { feedKey, updatedAt: new Date() } })
    await logAudit(tx, { actorId: user.id, action: 'calendar-feed.renewed', entityType: 'user', entityId: user.id })
  })
  return feedUrlOf(feedKey)
}

/** The person a feed token belongs to, or null (a malformed, forged, renewed or disabled one alike). */
export async function resolveCalendarFeed(token: string): Promise<AuthUser | null> {
  const m = /^([\w-]{10,64})\.([\w-]{20,100})\.ics$/.exec(token)
  if (!m) return null
  const [, feedKey, mac] = m
  const want = Buffer.from(sign(feedKey!))
  const got = Buffer.from(mac!)
  if (want.length !== got.length || !timingSafeEqual(want, got)) return null
  const [row] = await useDb().select({ id: users.id, role: users.role, name: users.name, email: users.email, timeZone: users.timeZone })
    .from(calendarFeeds).innerJoin(users, eq(users.id, calendarFeeds.userId))
    .where(and(eq(calendarFeeds.feedKey, feedKey!), isNull(users.disabledAt))).limit(1)
  return row ?? null
}

/** The feed's content: a handler's households' visits (without private notes), a trainer's own diary, the whole office's. */
export async function calendarFeedIcs(user: AuthUser, now = new Date()): Promise<string> {
  const db = useDb()
  const zone = await businessTimeZone(db)
  // A year back keeps recent history and every visit of a series still running (series last at most two years).
  const since = new Date(now.getTime() - 366 * 24 * 60 * 60_000)
  const rows = await appointmentQuery(db).where(and(
    user.role === 'trainer' ? eq(appointments.trainerId, user.id) : clientScope(user),
    gte(appointments.originalStartsAt, since),
  ))
  return renderIcs(rows, { name: user.role === 'handler' ? 'Forescent: our appointments' : `Forescent: ${user.name}`, timeZone: zone, forHousehold: user.role === 'handler' })
}
