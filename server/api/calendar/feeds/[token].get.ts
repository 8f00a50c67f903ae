// A private calendar feed (RFC 5545), fetched by a calendar app without a cookie: the token in the address is the
// key. Malformed, forged, renewed or disabled tokens all answer the same 404.
export default defineEventHandler(async (event) => {
  const token = String(event.context.params?.token ?? '')
  const user = await resolveCalendarFeed(token)
  if (!user) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'No calendar is published at this address. Copy the current address from your account page.' })
  const body = await calendarFeedIcs(user)
  setResponseHeaders(event, {
    'Content-Type': 'text/calendar; charset=utf-8',
    'Content-Disposition': 'inline; filename="forescent.ics"',
    'Cache-Control': 'private, no-store',
    'X-Robots-Tag': 'noindex',
  })
  return body
})
