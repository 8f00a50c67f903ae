import { createHash } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { requestKeys } from '../database/schema'
import { decideRequestKey, readTappedAt, REQUEST_KEY_HEADER, REQUEST_KEY_PATTERN, TAPPED_AT_HEADER, takesRequestKey } from '../../shared/utils/request-keys'

/**
 * Exactly once: a POST or PUT carrying an Idempotency-Key is handled once per key. The first answer is stored
 * (server/plugins/request-keys.ts) and a repeat gets it again; another person's key answers 404. An X-Tapped-At
 * header (the moment of the tap on the phone) is kept beside the time received; one more than a few minutes ahead
 * of the server's clock is refused.
 */
export default defineEventHandler(async (event) => {
  const method = event.method
  const path = event.path.split('?')[0]!
  if (!takesRequestKey(method, path)) return
  const now = new Date()
  const tapped = readTappedAt(getHeader(event, TAPPED_AT_HEADER), now)
  if (!tapped.ok) throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: tapped.message, data: { fieldErrors: { tappedAt: tapped.message } } })
  event.context.tappedAt = tapped.at
  const key = getHeader(event, REQUEST_KEY_HEADER)?.trim()
  if (!key) return
  if (!REQUEST_KEY_PATTERN.test(key)) {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The record key must be 16 to 100 letters, digits, "-" or "_" (for example a UUID).' })
  }
  const user = event.context.authUser
  if (!user) return // the route answers 401 itself
  // The body is read once, within its size limit, and kept for the route (server/utils/body.ts).
  const bodyHash = /json/i.test(getHeader(event, 'content-type') ?? '') ? createHash('sha256').update(await readBodyCapped(event, bodyLimitOf(event))).digest('hex') : null

  const db = useDb()
  for (let attempt = 0; attempt < 2; attempt++) {
    const [stored] = await db.select().from(requestKeys).where(eq(requestKeys.key, key)).limit(1)
    const decision = decideRequestKey(stored, { userId: user.id, method, path, bodyHash, now })
    switch (decision.kind) {
      case 'replay':
        setResponseStatus(event, stored!.statusCode ?? 200)
        setHeader(event, 'idempotent-replayed', 'true')
        setHeader(event, 'content-type', 'application/json')
        return stored!.response ?? 'null'
      case 'already-applied':
        // Made, but the server stopped before it could answer: the phone can stop sending it.
        throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This record was already received. Refresh the page to see it.', data: { alreadyReceived: true } })
      case 'in-progress':
        throw createError({ statusCode: 409, statusMessage: 'Conflict', message: decision.message, data: { retry: true } })
      case 'not-found':
        throw createError({ statusCode: 404, statusMessage: 'Not Found', message: decision.message })
      case 'mismatch':
        throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: decision.message })
      case 'retry-stale':
        await db.delete(requestKeys).where(eq(requestKeys.key, key))
        continue
      case 'new': {
        const inserted = await db.insert(requestKeys).values({ key, userId: user.id, method, path, bodyHash, state: 'pending', tappedAt: tapped.at, receivedAt: now })
          .onConflictDoNothing().returning({ key: requestKeys.key })
        if (inserted.length) {
          event.context.requestKey = key
          return
        }
        continue // another send of the same key won the race: decide again against it
      }
    }
  }
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'The first send of this record is still being handled. Try again in a moment.', data: { retry: true } })
})
