import { CLIENT_A } from '../../support/people'
import { tinyPng } from '../../support/files'
import { seedId } from '../../../scripts/lib/seed-data'
import { addDays } from '../../../shared/utils/invoices'
import { mondayOf, wallTimeOf } from '../../../shared/utils/schedule'
import { clientA, expect, signedIn, adminOnly, everyone, type Row } from '../../support/authz'
import type { Agent } from '../../support/http'

// The seeded visit of client A's weekly series today (scripts/lib/seed-schedule.ts), and a free day to book on.
const SERIES_VISIT = seedId('appointment:fairweather-weekly:1')
const bookDay = () => addDays(mondayOf(wallTimeOf(new Date(), 'Europe/London').date), 22)
const booking = { clientId: CLIENT_A, kind: 'home-visit', time: '10:00', endTime: '11:00' }

async function messageWithAttachment(admin: Agent) {
  const fd = new FormData()
  fd.append('body', 'A photo')
  fd.append('file', new Blob([tinyPng()], { type: 'image/png' }), 'photo.png')
  const res = await admin.request('POST', `/api/clients/${CLIENT_A}/messages`, fd)
  if (res.status !== 201) throw new Error(`Could not post a message: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.id as string }
}

export const rows: Row[] = [
  {
    route: 'GET /api/appointments', path: () => `/api/appointments?from=${wallTimeOf(new Date(), 'Europe/London').date}&to=${wallTimeOf(new Date(), 'Europe/London').date}`,
    expect: {
      ...signedIn(200),
      // Each sees only their own households' visits.
      handlerB: { status: 200, check: r => expect(r.body.rows.every((a: { clientId: string }) => a.clientId !== CLIENT_A)).toBe(true) },
      trainerB: { status: 200, check: r => expect(r.body.rows.every((a: { clientId: string }) => a.clientId !== CLIENT_A)).toBe(true) },
      handlerA: { status: 200, check: r => expect(r.body.rows.some((a: Record<string, unknown>) => 'privateNotes' in a)).toBe(false) },
    },
  },
  { route: 'POST /api/appointments', path: '/api/appointments', body: () => ({ ...booking, date: bookDay() }), mutates: true, expect: { ...clientA(201, 403), handlerB: 403 } },
  { route: 'POST /api/appointments/preview', path: '/api/appointments/preview', body: () => ({ ...booking, date: bookDay() }), expect: { ...clientA(200, 403), handlerB: 403 } },
  { route: 'GET /api/appointments/[id]', path: `/api/appointments/${SERIES_VISIT}`, expect: clientA(200) },
  { route: 'PATCH /api/appointments/[id]', path: `/api/appointments/${SERIES_VISIT}`, body: { place: 'The barn' }, mutates: true, expect: clientA(200, 403) },
  { route: 'POST /api/appointments/[id]/cancel', path: `/api/appointments/${SERIES_VISIT}/cancel`, body: { reason: 'Rain' }, mutates: true, expect: clientA(200, 403) },
  { route: 'GET /api/calendar/feed', path: '/api/calendar/feed', expect: { ...signedIn(200), handlerA: { status: 200, check: r => expect(r.body.url).toMatch(/\.ics$/) } } },
  { route: 'POST /api/calendar/feed/renew', path: '/api/calendar/feed/renew', mutates: true, expect: signedIn(200) },
  // The feed is reached by its secret token, never by a session: a made-up token is 404 for everyone.
  { route: 'GET /api/calendar/feeds/[token]', path: '/api/calendar/feeds/abcdefghijkl.AAAAAAAAAAAAAAAAAAAAAAAA.ics', expect: everyone(404) },
  { route: 'GET /api/clients/[id]/messages', path: `/api/clients/${CLIENT_A}/messages`, expect: clientA(200) },
  { route: 'POST /api/clients/[id]/messages', path: `/api/clients/${CLIENT_A}/messages`, body: { body: 'Hello' }, mutates: true, expect: clientA(201) },
  { route: 'POST /api/clients/[id]/messages/read', path: `/api/clients/${CLIENT_A}/messages/read`, mutates: true, expect: clientA(200) },
  {
    route: 'GET /api/messages', path: '/api/messages',
    expect: {
      ...signedIn(200),
      handlerB: { status: 200, check: r => expect(r.body.rows.map((c: { clientId: string }) => c.clientId)).not.toContain(CLIENT_A) },
      trainerB: { status: 200, check: r => expect(r.body.rows.map((c: { clientId: string }) => c.clientId)).not.toContain(CLIENT_A) },
    },
  },
  { route: 'GET /api/messages/[id]/attachment', path: (_a, ctx) => `/api/messages/${ctx.id}/attachment`, prepare: messageWithAttachment, mutates: true, expect: clientA(200) },
  { route: 'GET /api/today', path: '/api/today', expect: signedIn(200) },
  { route: 'GET /api/today/counts', path: '/api/today/counts', expect: signedIn(200) },
  { route: 'GET /api/account/reminders', path: '/api/account/reminders', expect: signedIn(200) },
  { route: 'PUT /api/account/reminders', path: '/api/account/reminders', body: { messages: false }, mutates: true, expect: signedIn(200) },
  { route: 'POST /api/reminders/run', path: '/api/reminders/run', mutates: true, expect: adminOnly(200) },
]
