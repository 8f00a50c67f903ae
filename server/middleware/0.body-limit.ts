// Request bodies by route class (shared/utils/request-guard.ts): a declared size over the class's limit is refused
// with 413 before anything is read, and the readers (readValidatedJson, the webhook) stop at the same limit while
// reading a body sent without a length. State-changing JSON routes take only application/json (415 otherwise), so
// a plain HTML form on another site cannot post to them. Uploads keep their own streaming limits.
import { BODY_LIMITS, SAFE_METHODS, bodyClassOf, isJsonContentType } from '../../shared/utils/request-guard'

export default defineEventHandler((event) => {
  if (SAFE_METHODS.has(event.method) || !event.path.startsWith('/api/')) return
  const cls = bodyClassOf(event.path)
  if (cls === 'upload') return
  const limit = BODY_LIMITS[cls]
  event.context.bodyLimit = limit
  const declared = declaredLength(event)
  if (declared !== null && declared > limit) {
    logEvent('request.too-large', { declared, limit }, 'warn', event)
    bodyTooLarge(limit)
  }
  const hasBody = (declared ?? 0) > 0 || !!getRequestHeader(event, 'transfer-encoding')
  if (cls !== 'webhook' && hasBody && !isJsonContentType(getRequestHeader(event, 'content-type'))) {
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: 'Send the data as JSON (Content-Type: application/json).' })
  }
})
