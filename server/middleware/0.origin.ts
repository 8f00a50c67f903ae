// Refuses state-changing requests that do not show they come from our own pages (nuxt-auth-utils has no CSRF
// protection of its own): see judgeOrigin in shared/utils/request-guard.ts. Our origin is the request's own scheme,
// host and port; X-Forwarded-Host and -Proto are believed only with TRUST_PROXY (our own proxy in front).
import { SAFE_METHODS, judgeOrigin } from '../../shared/utils/request-guard'

// Routes called by other servers with their own authentication (signed webhooks) are exempt.
const EXEMPT = [/^\/api\/webhooks\//]

export default defineEventHandler((event) => {
  if (SAFE_METHODS.has(event.method)) return
  const path = event.path.split('?')[0]!
  if (EXEMPT.some(re => re.test(path))) return
  const ownOrigin = getRequestURL(event, { xForwardedHost: trustProxy(), xForwardedProto: trustProxy() }).origin
  const verdict = judgeOrigin({ origin: getRequestHeader(event, 'origin'), secFetchSite: getRequestHeader(event, 'sec-fetch-site'), ownOrigin })
  if (verdict === 'same-origin') return
  logEvent('request.cross-site-refused', { verdict }, 'warn', event)
  throw createError({
    statusCode: 403,
    statusMessage: 'Forbidden',
    message: verdict === 'missing'
      ? 'This request did not say which page sent it, so it was refused. Use Forescent in an up-to-date browser, or reload the page and try again.'
      : 'This request came from another website and was refused.',
  })
})
