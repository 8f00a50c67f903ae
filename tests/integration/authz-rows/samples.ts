import { seedId } from '../../../scripts/lib/seed-data'
import { CLIENT_A } from '../../support/people'
import { clientA, expect, signedIn, type Ctx, type Row } from '../../support/authz'
import type { Agent } from '../../support/http'

// Client A's demo bank (scripts/lib/seed-samples.ts): sample 7 is a fresh, unused target; sample 8 a quick save
// whose checklist is not answered yet; the first target outer bag is full of seeded bags.
const FRESH_TARGET = seedId('sample:fairweather:7')
const QUICK_TARGET = seedId('sample:fairweather:8')
const TARGET_BAG = seedId('sample-outer-bag:fairweather:target:0')
const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString()
const clean = { lastAteAt: null, lastDrankOtherThanWaterAt: null, lastBrushedTeethAt: null, lastChewingGumAt: null, lastAlcoholAt: null, lastSmokedAt: null, lastWaterAt: null, unknown: [], washedHandsUnscented: true }

async function compromisedSample(admin: Agent): Promise<Ctx> {
  const res = await admin.post(`/api/clients/${CLIENT_A}/samples`, { kind: 'control', collectedAt: minutesAgo(1), rolls: 3, answers: { ...clean, lastAteAt: minutesAgo(11) } })
  if (res.status !== 201 || !res.body.compromised) throw new Error(`prepare failed: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.id }
}
async function openUse(admin: Agent): Promise<Ctx> {
  const res = await admin.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(2), stage: 'discrimination' })
  if (res.status !== 201) throw new Error(`prepare failed: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.use.id }
}

export const rows: Row[] = [
  // The trainer's choice to keep flagged targets out of training: the household's handler is refused.
  { route: 'PUT /api/clients/[id]/sample-settings', path: `/api/clients/${CLIENT_A}/sample-settings`, body: { excludeFlaggedTargets: true }, mutates: true, expect: clientA(200, 403) },
  {
    route: 'GET /api/clients/[id]/samples', path: `/api/clients/${CLIENT_A}/samples`,
    expect: {
      ...clientA(200),
      handlerA: { status: 200, check: r => { expect(r.body.canOverride).toBe(false); expect(r.body.samples.every((s: { id: string }) => typeof s.id === 'string')).toBe(true) } },
      trainerA: { status: 200, check: r => expect(r.body.canOverride).toBe(true) },
    },
  },
  {
    route: 'POST /api/clients/[id]/samples', path: `/api/clients/${CLIENT_A}/samples`, mutates: true,
    body: () => ({ kind: 'control', collectedAt: minutesAgo(1), rolls: 4, answers: clean }), expect: clientA(201),
  },
  // A quick save made on a phone with no signal carries the code already written on the bag.
  {
    route: 'POST /api/clients/[id]/samples', path: `/api/clients/${CLIENT_A}/samples`, mutates: true,
    body: () => ({ kind: 'target', collectedAt: minutesAgo(2), firstSymptomsAt: minutesAgo(10), rolls: 2, bagCode: 'T-QRS2D' }), expect: clientA(201),
  },
  // Anyone signed in may reserve a prefix for the phone they collect on (shared/utils/bag-codes.ts).
  { route: 'POST /api/bag-code-prefixes', path: '/api/bag-code-prefixes', mutates: true, body: {}, expect: signedIn(201) },
  { route: 'POST /api/clients/[id]/sample-containers', path: `/api/clients/${CLIENT_A}/sample-containers`, mutates: true, body: { kind: 'target', label: 'Spare tub' }, expect: clientA(201) },
  { route: 'GET /api/samples/[id]', path: `/api/samples/${FRESH_TARGET}`, expect: clientA(200) },
  { route: 'PUT /api/samples/[id]/answers', path: `/api/samples/${QUICK_TARGET}/answers`, mutates: true, body: { answers: clean }, expect: clientA(200) },
  { route: 'POST /api/samples/[id]/store', path: `/api/samples/${QUICK_TARGET}/store`, mutates: true, body: { newOuterBag: { containerId: null } }, expect: clientA(200) },
  {
    route: 'POST /api/samples/[id]/uses', path: `/api/samples/${FRESH_TARGET}/uses`, mutates: true,
    body: () => ({ outAt: minutesAgo(10), backAt: minutesAgo(7), stage: 'discrimination' }), expect: clientA(201),
  },
  { route: 'POST /api/samples/[id]/override', path: (_a, ctx) => `/api/samples/${ctx.id}/override`, prepare: compromisedSample, mutates: true, body: { reason: 'Ate a plain rice cracker; fine for discrimination.' }, expect: clientA(200, 403) },
  { route: 'POST /api/samples/[id]/discard', path: `/api/samples/${FRESH_TARGET}/discard`, mutates: true, body: { reason: 'Bag torn' }, expect: clientA(200) },
  { route: 'PATCH /api/sample-uses/[id]', path: (_a, ctx) => `/api/sample-uses/${ctx.id}`, prepare: openUse, mutates: true, body: () => ({ backAt: new Date().toISOString() }), expect: clientA(200) },
  { route: 'PATCH /api/sample-outer-bags/[id]', path: `/api/sample-outer-bags/${TARGET_BAG}`, mutates: true, body: { containerId: null }, expect: clientA(200) },
]
