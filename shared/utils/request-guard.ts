// The cross-site request rule and the request-body classes, as pure functions (server/middleware uses them).

/** Methods that never change anything: no origin check, no body. */
export const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS'])

export type OriginVerdict = 'same-origin' | 'missing' | 'cross-site'

/**
 * A state-changing request must show where it comes from (OWASP ASVS 4.0 V13.2.3 and V4.2.2; the OWASP CSRF
 * Prevention Cheat Sheet's "verifying origin with standard headers" and "Fetch Metadata headers"): an Origin equal
 * to our own origin (scheme, host and port), or, when a browser sends no Origin, Sec-Fetch-Site: same-origin. A
 * request with neither is refused: every browser we support sends at least one of them on such requests.
 */
export function judgeOrigin(input: { origin?: string | null, secFetchSite?: string | null, ownOrigin: string }): OriginVerdict {
  const { origin, secFetchSite, ownOrigin } = input
  if (secFetchSite && secFetchSite !== 'same-origin') return 'cross-site'
  if (origin !== undefined && origin !== null && origin !== '') {
    let parsed: string
    try { parsed = new URL(origin).origin }
    catch { return 'cross-site' }
    // An origin is scheme://host[:port] and nothing else (RFC 6454 section 7).
    if (parsed === 'null' || parsed !== origin.replace(/\/$/, '').toLowerCase() || parsed !== new URL(ownOrigin).origin) return 'cross-site'
    return 'same-origin'
  }
  return secFetchSite === 'same-origin' ? 'same-origin' : 'missing'
}

/** How a route's request body is read and how large it may be. */
export type BodyClass = 'json' | 'auth' | 'webhook' | 'upload'

// Sizes (our choice, "common practice": far above any real form of ours, far below what hurts memory): the largest
// real JSON body is a training session of 200 trials (~60 KB); sign-in and reset forms are under 1 KB (32 KB leaves room
// for a field pasted far too long to get its own 422 message); Stripe events
// are a few KB. Uploads keep their own streaming limits (documents 15 MB, photos, resumable video chunks).
export const BODY_LIMITS: Record<Exclude<BodyClass, 'upload'>, number> = {
  json: 256 * 1024,
  auth: 32 * 1024,
  webhook: 256 * 1024,
}

// Routes whose bodies are files (multipart forms) or resumable-upload chunks (tus): checked by their own readers.
const UPLOAD_ROUTES = [
  /^\/api\/clients\/[^/]+\/documents$/,
  /^\/api\/dogs\/[^/]+\/photo$/,
  /^\/api\/homework-uploads(\/[^/]+)?$/,
  // A message may carry a photo or a PDF (multipart); without one it is JSON, checked by the route itself.
  /^\/api\/clients\/[^/]+\/messages$/,
  // The business's logo (multipart, 512 KB).
  /^\/api\/business-logo$/,
]
// Routes anyone can call without signing in: a small limit.
const AUTH_ROUTES = [/^\/api\/auth\//, /^\/api\/invitations\/[^/]+\/accept$/]

export function bodyClassOf(path: string): BodyClass {
  const p = path.split('?')[0]!
  if (p.startsWith('/api/webhooks/')) return 'webhook'
  if (UPLOAD_ROUTES.some(re => re.test(p))) return 'upload'
  if (AUTH_ROUTES.some(re => re.test(p))) return 'auth'
  return 'json'
}

/** A JSON media type: application/json, with or without parameters such as charset (RFC 8259 section 11). */
export function isJsonContentType(contentType: string | undefined | null): boolean {
  return !!contentType && /^application\/json\s*(;|$)/i.test(contentType.trim())
}
