// Every request gets an id, sent back in X-Request-Id and written on each of its log lines; one access line per API
// call and page (method, path, status, duration, who) when it is answered; refused requests (401, 403) are logged as
// security events; every 5xx is logged with its stack and the request id, which the person can quote to the office:
// a JSON answer of 500 or more carries the id in its body too ({ statusCode, message, requestId }), never a stack.
import { randomUUID } from 'node:crypto'
import { eventHandler, type H3Error, type H3Event } from 'h3'
import { requestAddress } from '../utils/throttle'

// An id handed in by our own proxy is kept (so one id follows the request across hops) only behind TRUST_PROXY.
const INCOMING_ID = /^[A-Za-z0-9._-]{8,64}$/

function isLoggedPath(path: string) {
  return !path.startsWith('/_nuxt/') && !path.startsWith('/__nuxt') && !path.startsWith('/_fonts/') && !/\.(js|css|svg|png|ico|woff2?|map|txt|webmanifest)(\?|$)/i.test(path)
}

export default defineNitroPlugin((nitro) => {
  nitro.hooks.hook('request', (event) => {
    const incoming = trustProxy() ? getRequestHeader(event, 'x-request-id') : undefined
    event.context.requestId = incoming && INCOMING_ID.test(incoming) ? incoming : randomUUID()
    event.context.requestStartedAt = performance.now()
    event.context.clientAddress = requestAddress(event)
    setResponseHeader(event, 'X-Request-Id', event.context.requestId)
  })

  // One access line per request: from afterResponse for answers, from the error hook for errors (h3 answers an error
  // through the error handler and never calls afterResponse for it).
  const logAnswer = (event: H3Event, status: number) => {
    if (event.context.answerLogged || !isLoggedPath(event.path)) return
    event.context.answerLogged = true
    const ms = Math.round((performance.now() - (event.context.requestStartedAt ?? performance.now())) * 10) / 10
    if (status === 401 || status === 403) logEvent('access.refused', { status }, 'warn', event)
    logEvent('http.request', { status, ms }, status >= 500 ? 'error' : 'info', event)
  }

  nitro.hooks.hook('afterResponse', event => logAnswer(event, event.node.res.statusCode))

  nitro.hooks.hook('error', (error, { event }) => {
    const status = (error as { statusCode?: number }).statusCode ?? 500
    if (status >= 500) logEvent('http.error', { status, err: { name: error.name, message: error.message, stack: error.stack } }, 'error', event)
    if (event) logAnswer(event, status)
  })

  // JSON 5xx answers are written here, before Nitro's own error handler (which has no place for the id): h3 reads
  // onError when an error happens, so wrapping it covers every route, middleware and handler.
  const answerError = nitro.h3App.options.onError!
  nitro.h3App.options.onError = (error: H3Error, event: H3Event) => {
    const status = error.statusCode || 500
    if (status < 500 || event.handled || !wantsJson(event)) return answerError(error, event)
    nitro.captureError(error, { event, tags: ['request'] })
    // An unhandled error's own message may name internals: only errors we raised on purpose keep theirs.
    const sensitive = error.unhandled || error.fatal
    const statusMessage = sensitive ? 'Server Error' : (error.statusMessage || 'Server Error')
    setResponseStatus(event, status, statusMessage)
    setResponseHeaders(event, { 'content-type': 'application/json', 'x-content-type-options': 'nosniff', 'cache-control': 'no-store' })
    return send(event, JSON.stringify({
      error: true,
      statusCode: status,
      statusMessage,
      message: sensitive ? 'Server Error' : error.message,
      requestId: event.context.requestId,
    }))
  }

  // A route that fails on purpose, for the integration tests only: it is registered when TEST_FAULTS=1 (set by
  // tests/support/stack.ts) and does not exist otherwise. Outside /api, so the authorization matrix does not see it.
  if (process.env.TEST_FAULTS === '1') {
    nitro.router.get('/__test/fault', eventHandler(() => {
      throw new Error('deliberate test fault: internal detail that must not reach the answer')
    }))
  }
})

/** As Nuxt decides it for its error page: API paths and requests asking for JSON rather than a page. */
function wantsJson(event: H3Event) {
  const accept = String(getRequestHeader(event, 'accept') || '').toLowerCase()
  if (accept.includes('text/html')) return false
  return event.path.startsWith('/api/') || accept.includes('application/json')
}
