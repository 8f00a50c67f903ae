// Refuses state-changing requests from other sites (nuxt-auth-utils has no CSRF protection of its own).
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])
// Routes called by other servers with their own authentication (e.g. signed webhooks) are exempt.
const EXEMPT = [/^\/api\/webhooks\//]

export default defineEventHandler((event) => {
  if (SAFE.has(event.method)) return
  const path = event.path.split('?')[0]!
  if (EXEMPT.some(re => re.test(path))) return
  const site = getRequestHeader(event, 'sec-fetch-site')
  if (site && site !== 'same-origin' && site !== 'none') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'This request came from another website and was refused.' })
  }
  const origin = getRequestHeader(event, 'origin')
  if (origin && origin !== 'null') {
    const host = getRequestHeader(event, 'x-forwarded-host') || getRequestHeader(event, 'host')
    let originHost = ''
    try { originHost = new URL(origin).host }
    catch { /* unparsable origin: refused below */ }
    if (originHost !== host) {
      throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'This request came from another website and was refused.' })
    }
  }
  else if (origin === 'null') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'This request came from another website and was refused.' })
  }
})
