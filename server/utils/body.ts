// Reading request bodies with a size limit, refused with 413 before and while reading (never parsed past the limit).
import type { H3Event } from 'h3'
import { BODY_LIMITS } from '../../shared/utils/request-guard'
import { formatBytes } from '../../shared/utils/documents'

export function bodyTooLarge(limit: number, message = `The request is larger than the limit of ${formatBytes(limit)}. Send less at once.`): never {
  throw createError({ statusCode: 413, statusMessage: 'Content Too Large', message })
}

/** The declared Content-Length, or null when the body is sent without one (chunked). */
export function declaredLength(event: H3Event): number | null {
  const raw = getRequestHeader(event, 'content-length')
  if (raw === undefined) return null
  const n = Number(raw)
  return Number.isFinite(n) && n >= 0 ? n : null
}

/**
 * The request body, refused with 413 as soon as it grows past `limit` bytes (whether or not Content-Length says
 * so); `tooLarge` makes the error. The rest of a refused body is drained, not kept.
 */
export async function readBodyCapped(event: H3Event, limit: number, tooLarge: () => never = () => bodyTooLarge(limit)): Promise<Buffer> {
  // Read once per request: the record-key middleware hashes the body before the route parses it.
  const kept = event.context.cappedBody as Buffer | undefined
  if (kept) return kept
  const declared = declaredLength(event)
  if (declared !== null && declared > limit) tooLarge()
  const req = event.node.req
  return new Promise<Buffer>((ok, fail) => {
    const chunks: Buffer[] = []
    let total = 0
    let done = false
    const finish = (err?: unknown) => {
      if (done) return
      done = true
      req.off('data', onData)
      if (err) {
        // Drop the rest of the body: Node discards unread request data once the response is sent.
        req.resume()
        fail(err)
      }
      else {
        const body = Buffer.concat(chunks)
        event.context.cappedBody = body
        ok(body)
      }
    }
    const onData = (chunk: Buffer) => {
      total += chunk.length
      if (total > limit) {
        try { tooLarge() }
        catch (err) { finish(err) }
        return
      }
      chunks.push(chunk)
    }
    req.on('data', onData)
    req.once('end', () => finish())
    req.once('error', () => finish(createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The request was interrupted. Please try again.' })))
  })
}

/** The size limit of this request's class (set by server/middleware/0.body-limit.ts), JSON's by default. */
export function bodyLimitOf(event: H3Event): number {
  return (event.context.bodyLimit as number | undefined) ?? BODY_LIMITS.json
}
