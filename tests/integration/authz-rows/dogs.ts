import { seedId } from '../../../scripts/lib/seed-data'
import { CLIENT_A } from '../../support/people'
import { clientA, expect, type Row } from '../../support/authz'

// Juniper (client A's dog) and her first seeded health record.
const DOG_A = seedId('dog:fairweather')
const HEALTH_A = seedId('dog-health:fairweather:0')
const yesterday = () => new Date(Date.now() - 86_400_000).toISOString().slice(0, 10)
const scores = { scentDrive: 4, focus: 4, environmentalConfidence: 4, sociability: 4, startleRecovery: 4, handlerEngagement: 4 }

export const rows: Row[] = [
  { route: 'POST /api/clients/[id]/dogs', path: `/api/clients/${CLIENT_A}/dogs`, body: { name: 'Matrix' }, mutates: true, expect: clientA(201, 403) },
  {
    route: 'GET /api/clients/[id]/dogs', path: `/api/clients/${CLIENT_A}/dogs`,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.body.map((d: { id: string }) => d.id)).toEqual([DOG_A]) } },
  },
  {
    route: 'GET /api/dogs/[id]', path: `/api/dogs/${DOG_A}`,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.body.canEdit).toBe(false) } },
  },
  { route: 'PATCH /api/dogs/[id]', path: `/api/dogs/${DOG_A}`, body: { notes: 'Loves the scent wall.' }, mutates: true, expect: clientA(200, 403) },
  { route: 'POST /api/dogs/[id]/status', path: `/api/dogs/${DOG_A}/status`, body: () => ({ status: 'placed', effectiveOn: yesterday() }), mutates: true, expect: clientA(201, 403) },
  {
    route: 'POST /api/dogs/[id]/health-records', path: `/api/dogs/${DOG_A}/health-records`, mutates: true,
    body: () => ({ kind: 'vaccination', name: 'Rabies', doneOn: yesterday(), dueOn: null }), expect: clientA(201, 403),
  },
  {
    route: 'POST /api/dogs/[id]/assessments', path: `/api/dogs/${DOG_A}/assessments`, mutates: true,
    body: () => ({ assessedOn: yesterday(), scores, outcome: 'accept' }), expect: clientA(201, 403),
  },
  { route: 'PATCH /api/health-records/[id]', path: `/api/health-records/${HEALTH_A}`, body: { note: 'Certificate on file.' }, mutates: true, expect: clientA(200, 403) },
  { route: 'DELETE /api/health-records/[id]', path: `/api/health-records/${HEALTH_A}`, mutates: true, expect: clientA(200, 403) },
]
