import { CLIENT_A } from '../../support/people'
import { clientA, expect, type Row } from '../../support/authz'
import type { Agent } from '../../support/http'

const minutesAgo = (n: number) => new Date(Date.now() - n * 60_000).toISOString()

/** An alert on client A's diary, logged by the admin, for the rows that need one. */
async function logAlert(admin: Agent) {
  const res = await admin.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alert', occurredAt: minutesAgo(30) })
  if (res.status !== 201) throw new Error(`Could not log an alert: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.id as string }
}
async function setWindow(admin: Agent) {
  const res = await admin.request('PUT', `/api/clients/${CLIENT_A}/diary-window`, { minMinutes: 0, maxMinutes: 180 })
  if (res.status !== 200) throw new Error(`Could not set the window: ${res.status} ${JSON.stringify(res.body)}`)
  return {}
}

export const rows: Row[] = [
  {
    route: 'GET /api/clients/[id]/diary', path: `/api/clients/${CLIENT_A}/diary`,
    expect: {
      ...clientA(200),
      // The household sees its own diary, without the trainer's refresher figures.
      handlerA: { status: 200, check: r => { expect(r.body.entries.length).toBeGreaterThan(0); expect(r.body.refresher).toBeNull(); expect(r.body.canReview).toBe(false) } },
    },
  },
  // Handlers log for their own household; the trainer and the admin on its behalf.
  { route: 'POST /api/clients/[id]/diary', path: `/api/clients/${CLIENT_A}/diary`, body: () => ({ kind: 'episode', occurredAt: minutesAgo(5) }), mutates: true, expect: clientA(201) },
  { route: 'PUT /api/clients/[id]/diary-window', path: `/api/clients/${CLIENT_A}/diary-window`, body: { minMinutes: 0, maxMinutes: 180 }, mutates: true, expect: clientA(200, 403) },
  { route: 'DELETE /api/clients/[id]/diary-window', path: `/api/clients/${CLIENT_A}/diary-window`, prepare: setWindow, mutates: true, expect: clientA(200, 403) },
  { route: 'PATCH /api/diary-entries/[id]', path: (_a, ctx) => `/api/diary-entries/${ctx.id}`, prepare: logAlert, body: { place: 'Kitchen' }, mutates: true, expect: clientA(200) },
  { route: 'DELETE /api/diary-entries/[id]', path: (_a, ctx) => `/api/diary-entries/${ctx.id}`, prepare: logAlert, mutates: true, expect: clientA(200) },
  // Reviews are the trainer's: the household's handler is refused, other people's alerts are not found.
  { route: 'POST /api/diary-entries/[id]/review', path: (_a, ctx) => `/api/diary-entries/${ctx.id}/review`, prepare: logAlert, body: { comment: 'Clear alert.' }, mutates: true, expect: clientA(200, 403) },
]
