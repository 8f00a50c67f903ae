import { seedId } from '../../../scripts/lib/seed-data'
import { CLIENT_A } from '../../support/people'
import { adminOnly, clientA, expect, type Row } from '../../support/authz'

const yesterday = () => new Date(Date.now() - 86_400_000).toISOString().slice(0, 10)
const DISCRIMINATION = seedId('milestone:fairweather:3')
const SESSION = seedId('session:fairweather:0')
const TRIAL = seedId('trial:fairweather:0:0')
// Lindgren: trainer A's client with no programme yet (handler A is not in that household).
const LINDGREN = seedId('client:lindgren')

export const rows: Row[] = [
  {
    route: 'GET /api/programme-templates', path: '/api/programme-templates',
    expect: { anonymous: 401, handlerA: 403, handlerB: 403, trainerA: { status: 200, check: r => expect(r.body.rows[0].milestones.length).toBe(10) }, trainerB: 200, admin: 200 },
  },
  {
    route: 'GET /api/clients/[id]/programme', path: `/api/clients/${CLIENT_A}/programme`,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.body.currentId).toBe(DISCRIMINATION) } },
  },
  {
    route: 'POST /api/clients/[id]/programme', path: `/api/clients/${LINDGREN}/programme`, body: { templateId: seedId('template:default') }, mutates: true,
    expect: { anonymous: 401, handlerA: 404, handlerB: 404, trainerA: { status: 201, check: r => expect(r.body.milestones.length).toBe(10) }, trainerB: 404, admin: 201 },
  },
  {
    route: 'GET /api/clients/[id]/training-sessions', path: `/api/clients/${CLIENT_A}/training-sessions`,
    expect: { ...clientA(200), trainerA: { status: 200, check: r => expect(r.body.rows.length).toBe(5) } },
  },
  {
    route: 'POST /api/clients/[id]/training-sessions', path: `/api/clients/${CLIENT_A}/training-sessions`, mutates: true,
    body: () => ({ dogId: seedId('dog:fairweather'), day: yesterday(), stage: 'discrimination', blind: false, trials: [{ stations: 3, targetStation: 1, indicatedStation: 1 }] }),
    expect: { ...clientA(201), handlerA: { status: 201, check: r => expect(r.body.runBy).toBe('handler') } },
  },
  {
    route: 'PATCH /api/client-milestones/[id]', path: `/api/client-milestones/${DISCRIMINATION}`, mutates: true,
    body: { criteria: { windowDays: 30, minTrials: 60, minSessions: 8, minDays: 5, minBlindPercent: 60, minSensitivityLowerPercent: 85, minSpecificityLowerPercent: 85 } },
    expect: clientA(200, 403),
  },
  {
    route: 'POST /api/client-milestones/[id]/confirm', path: `/api/client-milestones/${DISCRIMINATION}/confirm`, mutates: true,
    body: { reason: 'Assessed in person over three visits; figures to follow.' },
    expect: clientA(200, 403),
  },
  { route: 'GET /api/training-sessions/[id]', path: `/api/training-sessions/${SESSION}`, expect: clientA(200) },
  {
    route: 'POST /api/training-sessions/[id]/trials', path: `/api/training-sessions/${SESSION}/trials`, mutates: true,
    body: { stations: 3, targetStation: null, indicatedStation: null }, expect: clientA(201),
  },
  { route: 'DELETE /api/training-trials/[id]', path: `/api/training-trials/${TRIAL}`, mutates: true, expect: clientA(200) },
  {
    route: 'PUT /api/programme-templates/[id]', path: `/api/programme-templates/${seedId('template:default')}`, mutates: true,
    body: { name: 'Short programme', milestones: [{ name: 'Intake', handlerText: 'Getting to know you and your dog.', measured: false }, { name: 'Discrimination', handlerText: 'Picks the target out of a line-up.', measured: true }] },
    expect: { ...adminOnly(200), admin: { status: 200, check: r => expect(r.body.milestones.length).toBe(2) } },
  },
  {
    route: 'DELETE /api/client-milestones/[id]', path: `/api/client-milestones/${seedId('milestone:fairweather:5')}`, mutates: true,
    expect: clientA(200, 403),
  },
  {
    route: 'POST /api/clients/[id]/milestones', path: `/api/clients/${CLIENT_A}/milestones`, mutates: true,
    body: { name: 'Alerts in the car', handlerText: 'Your dog alerts just as well on car journeys.', position: 5 },
    expect: { ...clientA(201, 403), trainerA: { status: 201, check: r => expect(r.body.position).toBe(5) } },
  },
  {
    route: 'PUT /api/clients/[id]/milestone-order', path: `/api/clients/${CLIENT_A}/milestone-order`, mutates: true,
    body: { ids: [4, 3, 5, 6, 7, 8, 9].map(n => seedId(`milestone:fairweather:${n}`)) },
    expect: { ...clientA(200, 403), admin: { status: 200, check: r => expect(r.body.moved).toBe(2) } },
  },
  {
    route: 'GET /api/training-sessions', path: '/api/training-sessions',
    expect: {
      anonymous: 401, handlerA: 403, handlerB: 403,
      trainerA: { status: 200, check: r => expect(r.body.total).toBe(5) },
      trainerB: { status: 200, check: r => expect(r.body.total).toBe(1) },
      admin: { status: 200, check: r => expect(r.body.total).toBe(6) },
    },
  },
  {
    route: 'GET /api/dogs/[id]/reliability', path: `/api/dogs/${seedId('dog:fairweather')}/reliability`,
    expect: { ...clientA(200), trainerA: { status: 200, check: r => expect(r.body.reliability.overall.counts.trials).toBe(30) } },
  },
  {
    route: 'GET /api/clients/[id]/training-log.csv', path: `/api/clients/${CLIENT_A}/training-log.csv`,
    expect: { ...clientA(200), trainerA: { status: 200, check: r => expect(String(r.body).split('\r\n')[0]).toMatch(/^session_day,stage,/) } },
  },
]

// Several programme templates: the office creates, duplicates and archives them; staff preview a start's billing.
rows.push(
  {
    route: 'POST /api/programme-templates', path: '/api/programme-templates', mutates: true,
    body: { name: 'Night-time alert programme', milestones: [{ name: 'Intake', handlerText: 'Getting to know you and your dog.', measured: false }] },
    expect: adminOnly(201),
  },
  { route: 'POST /api/programme-templates/[id]/duplicate', path: `/api/programme-templates/${seedId('template:default')}/duplicate`, mutates: true, expect: adminOnly(201) },
  { route: 'POST /api/programme-templates/[id]/archive', path: `/api/programme-templates/${seedId('template:default')}/archive`, body: { archived: true }, mutates: true, expect: adminOnly(200) },
  {
    route: 'GET /api/clients/[id]/programme-preview', path: `/api/clients/${LINDGREN}/programme-preview?templateId=${seedId('template:default')}`,
    expect: { anonymous: 401, handlerA: 404, handlerB: 404, trainerA: { status: 200, check: r => expect(r.body.parts[0]).toMatchObject({ part: 'deposit', now: true }) }, trainerB: 404, admin: 200 },
  },
)
