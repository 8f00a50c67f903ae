// The sample bank through the API: collection, packing, uses and the restocking reminder, against the built server.
// Policy figures are the defaults (common practice): 45 minutes' fasting, 6 rolls a bag, 5 bags an outer bag, 3 uses,
// 5 minutes out, single-use imprinting, 21 days' warning. The 24-hour plausibility limit and the 28-day rate window
// are our own choices. The demo banks are in scripts/lib/seed-samples.ts.
import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { inbox, signIn, waitForMail, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')

const FRESH_TARGET = seedId('sample:fairweather:7') // collected 5 days ago, never used
const QUICK_TARGET = seedId('sample:fairweather:8') // quick-saved yesterday, checklist not answered
const FULL_TARGET_BAG = seedId('sample-outer-bag:fairweather:target:0') // holds 5 small bags
const CONTROL_BAG = seedId('sample-outer-bag:fairweather:control:5') // the second control outer bag: 3 small bags
const CONTROL_TUB = seedId('sample-container:fairweather:control')
const B_SAMPLE = seedId('sample:achterberg:0')
const B_BAG = seedId('sample-outer-bag:achterberg:target:0')
const LINDGREN = seedId('client:lindgren')

const MIN = 60_000
const minutesAgo = (m: number) => new Date(Date.now() - m * MIN).toISOString()
const clean = { lastAteAt: null, lastDrankOtherThanWaterAt: null, lastBrushedTeethAt: null, lastChewingGumAt: null, lastAlcoholAt: null, lastSmokedAt: null, lastWaterAt: null, unknown: [], washedHandsUnscented: true }

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try {
    await db.execute('PRAGMA busy_timeout = 5000') // the server's periodic check may be writing
    return (await db.execute({ sql, args })).rows
  }
  finally { db.close() }
}
const count = async (table: string, where = '1=1', args: (string | number)[] = []) => Number((await query(`select count(*) n from ${table} where ${where}`, args))[0]!.n)

async function collect(agent: Agent, body: Record<string, unknown> = {}, clientId = CLIENT_A) {
  return agent.post(`/api/clients/${clientId}/samples`, { kind: 'control', collectedAt: minutesAgo(1), rolls: 4, answers: clean, ...body })
}
const bank = async (agent: Agent, clientId = CLIENT_A) => (await agent.get(`/api/clients/${clientId}/samples`)).body
const sampleOf = async (agent: Agent, id: string) => (await agent.get(`/api/samples/${id}`)).body.sample

beforeEach(async () => { await resetDatabase(databaseUrl) })

describe('collecting', () => {
  it('the handler records a control by the protocol: a pencil code, usable, audited', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const res = await collect(handler)
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.bagCode).toMatch(/^C-[A-HJ-NP-Z2-9]{4}$/)
    expect(res.body).toMatchObject({ kind: 'control', rolls: 4, compromised: false })
    const s = await sampleOf(handler, res.body.id)
    expect(s).toMatchObject({ status: 'usable', usesLeft: 3, answersComplete: true }) // 3 uses (common practice)
    // Expiry 365 days and renewal 183 days after collection (common practice).
    expect(Date.parse(s.expiresAt) - Date.parse(s.collectedAt)).toBe(365 * 86_400_000)
    expect(Date.parse(s.renewAt) - Date.parse(s.collectedAt)).toBe(183 * 86_400_000)
    expect(await query('select action from audit_log where entity_id = ?', [res.body.id])).toEqual([expect.objectContaining({ action: 'sample.collected' })])
  })

  it('a meal 30 minutes before is saved but compromised (45 minutes, common practice); only the trainer can allow it', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const collectedAt = minutesAgo(1)
    const res = await collect(handler, { collectedAt, answers: { ...clean, lastAteAt: new Date(Date.parse(collectedAt) - 30 * MIN).toISOString() } })
    expect(res.status).toBe(201)
    expect(res.body.compromised).toBe(true)
    expect(res.body.compromisedReasons.map((p: { rule: string }) => p.rule)).toEqual(['fasting-food'])
    // Kept out of training…
    const refused = await handler.post(`/api/samples/${res.body.id}/uses`, { outAt: minutesAgo(0), stage: 'discrimination' })
    expect(refused.status).toBe(422)
    expect(refused.body.data.rules).toEqual(['compromised'])
    expect(await count('sample_uses', 'sample_id = ?', [res.body.id])).toBe(0)
    // …unless the trainer overrides it with a reason.
    expect((await handler.post(`/api/samples/${res.body.id}/override`, { reason: 'Looks fine' })).status).toBe(403)
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect((await trainer.post(`/api/samples/${res.body.id}/override`, { reason: '' })).status).toBe(422)
    expect((await trainer.post(`/api/samples/${res.body.id}/override`, { reason: 'Plain cracker; acceptable for discrimination.' })).status).toBe(200)
    expect((await sampleOf(trainer, res.body.id))).toMatchObject({ status: 'usable', overridden: true })
    expect((await handler.post(`/api/samples/${res.body.id}/uses`, { outAt: minutesAgo(0), stage: 'discrimination' })).status).toBe(201)
  })

  it('water 10 minutes before compromises (15 minutes, common practice); "not sure" compromises too', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const collectedAt = minutesAgo(1)
    const water = await collect(handler, { collectedAt, answers: { ...clean, lastWaterAt: new Date(Date.parse(collectedAt) - 10 * MIN).toISOString() } })
    expect(water.body.compromisedReasons.map((p: { rule: string }) => p.rule)).toEqual(['water-free'])
    const unsure = await collect(handler, { answers: { ...clean, unknown: ['lastSmokedAt'], washedHandsUnscented: false } })
    expect(unsure.body.compromisedReasons.map((p: { rule: string }) => p.rule)).toEqual(['fasting-smoking', 'unscented-soap'])
  })

  it('a quick save during an episode waits for its checklist, stays out of training, and is completed later', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const res = await collect(handler, { kind: 'target', firstSymptomsAt: minutesAgo(12), answers: undefined })
    expect(res.status).toBe(201)
    expect(res.body.bagCode).toMatch(/^T-/)
    expect(await sampleOf(handler, res.body.id)).toMatchObject({ status: 'awaiting-answers', usesLeft: 0 })
    const early = await handler.post(`/api/samples/${res.body.id}/uses`, { outAt: minutesAgo(0), stage: 'discrimination' })
    expect(early.body.data.rules).toEqual(['answers-missing'])
    const done = await handler.request('PUT', `/api/samples/${res.body.id}/answers`, { answers: clean })
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    expect(await sampleOf(handler, res.body.id)).toMatchObject({ status: 'usable', usesLeft: 3, answersComplete: true })
  })
})

describe('bad collections: a 4xx naming the problem, nothing written', () => {
  it('refuses a time in the future, too many rolls, a target without first symptoms, broken JSON', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = await count('samples')
    const future = await collect(handler, { collectedAt: new Date(Date.now() + 60 * MIN).toISOString() })
    expect(future.status).toBe(422)
    expect(future.body.data.rules).toEqual(['collected-in-future'])
    expect(future.body.data.fieldErrors.collectedAt).toMatch(/future/)
    const rolls = await collect(handler, { rolls: 7 }) // 6 rolls a bag (common practice)
    expect(rolls.status).toBe(422)
    expect(rolls.body.data.rules).toEqual(['rolls-over-limit'])
    expect(rolls.body.message).toMatch(/at most 6 cotton rolls/)
    const target = await collect(handler, { kind: 'target' })
    expect(target.body.data.rules).toEqual(['target-needs-first-symptoms'])
    const broken = await handler.request('POST', `/api/clients/${CLIENT_A}/samples`, '{"kind":', { 'content-type': 'application/json' })
    expect(broken.status).toBe(400)
    expect((await collect(handler, { kind: 'saliva' })).status).toBe(422)
    expect(await count('samples')).toBe(before)
    expect(await count('audit_log', "action like 'sample.%'")).toBe(0)
  })

  it('another household\'s sample, bag or file answers 404, like one that does not exist', async () => {
    const handlerA = await signIn(baseUrl, HANDLER_A)
    expect((await handlerA.get(`/api/samples/${B_SAMPLE}`)).status).toBe(404)
    expect((await handlerA.post(`/api/samples/${B_SAMPLE}/uses`, { outAt: minutesAgo(0), stage: 'discrimination' })).status).toBe(404)
    expect((await collect(handlerA, {}, CLIENT_B)).status).toBe(404)
    // Client A's sample into client B's outer bag: that bag is not in this household.
    const intoB = await handlerA.post(`/api/samples/${FRESH_TARGET}/store`, { outerBagId: B_BAG })
    expect(intoB.status).toBe(404)
    const trainerB = await signIn(baseUrl, TRAINER_B)
    expect((await trainerB.get(`/api/clients/${CLIENT_A}/samples`)).status).toBe(404)
    expect((await trainerB.get(`/api/samples/does-not-exist`)).status).toBe(404)
    const handlerB = await signIn(baseUrl, HANDLER_B)
    expect((await handlerB.get(`/api/samples/${FRESH_TARGET}`)).status).toBe(404)
    expect(await count('sample_uses', 'sample_id = ?', [B_SAMPLE])).toBe(3) // the seeded uses only
  })
})

describe('packing', () => {
  it('keeps targets and controls apart: a target bag in a control outer bag or container is refused', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const bags = await count('sample_outer_bags')
    const mixed = await handler.post(`/api/samples/${QUICK_TARGET}/store`, { outerBagId: CONTROL_BAG })
    expect(mixed.status).toBe(422)
    expect(mixed.body.data.rules).toEqual(['bag-kind-mismatch'])
    expect(mixed.body.message).toMatch(/a target bag cannot go in a control outer bag/)
    const tub = await handler.post(`/api/samples/${QUICK_TARGET}/store`, { newOuterBag: { containerId: CONTROL_TUB } })
    expect(tub.status).toBe(422)
    expect(tub.body.data.rules).toEqual(['container-kind-mismatch'])
    expect(await count('sample_outer_bags')).toBe(bags) // no half-made outer bag
    expect((await query('select outer_bag_id from samples where id = ?', [QUICK_TARGET]))[0]!.outer_bag_id).toBeNull()
  })

  it('refuses a 6th small bag in an outer bag (5 a bag, common practice); a new outer bag in a new tub works in one step', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    expect(await count('samples', 'outer_bag_id = ? and discarded_at is null', [FULL_TARGET_BAG])).toBe(5)
    const full = await handler.post(`/api/samples/${QUICK_TARGET}/store`, { outerBagId: FULL_TARGET_BAG })
    expect(full.status).toBe(422)
    expect(full.body.data.rules).toEqual(['outer-bag-full'])
    const fresh = await handler.post(`/api/samples/${QUICK_TARGET}/store`, { newOuterBag: { newContainerLabel: 'Blue tub' } })
    expect(fresh.status, JSON.stringify(fresh.body)).toBe(200)
    const b = await bank(handler)
    const bag = b.outerBags.find((x: { id: string }) => x.id === fresh.body.outerBagId)
    expect(bag).toMatchObject({ kind: 'target', bags: 1 })
    expect(b.containers.find((c: { id: string }) => c.id === bag.containerId)).toMatchObject({ kind: 'target', label: 'Blue tub' })
    // A control outer bag cannot move into a target container either.
    const move = await handler.patch(`/api/sample-outer-bags/${CONTROL_BAG}`, { containerId: bag.containerId })
    expect(move.status).toBe(422)
    expect(move.body.data.rules).toEqual(['container-kind-mismatch'])
  })
})

describe('uses', () => {
  it('allows 3 uses and refuses the 4th (common practice); the sample is then used up', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    for (const m of [60, 40, 20]) {
      const r = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(m), backAt: minutesAgo(m - 3), stage: 'discrimination', sessionRef: `Session at -${m}` })
      expect(r.status, JSON.stringify(r.body)).toBe(201)
    }
    expect(await sampleOf(handler, FRESH_TARGET)).toMatchObject({ status: 'used-up', usesLeft: 0, usesRecorded: 3 })
    const fourth = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(5), backAt: minutesAgo(2), stage: 'discrimination' })
    expect(fourth.status).toBe(422)
    expect(fourth.body.data.rules).toEqual(['used-up'])
    expect(await count('sample_uses', 'sample_id = ?', [FRESH_TARGET])).toBe(3)
  })

  it('an open use is closed when the sample goes back; over 5 minutes is flagged (common practice); over 24 hours refused', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const open = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(7), stage: 'alert' })
    expect(open.status).toBe(201)
    expect(await sampleOf(handler, FRESH_TARGET)).toMatchObject({ openUse: true, overdueUse: true })
    const again = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(1), stage: 'alert' })
    expect(again.body.data.rules).toEqual(['another-use-open'])
    const back = await handler.patch(`/api/sample-uses/${open.body.use.id}`, { backAt: new Date().toISOString() })
    expect(back.status).toBe(200)
    expect(back.body.use.overLimit).toBe(true)
    expect(back.body.warnings.map((w: { rule: string }) => w.rule)).toEqual(['over-time-limit'])
    expect((await handler.patch(`/api/sample-uses/${open.body.use.id}`, { backAt: new Date().toISOString() })).body.data.rules).toEqual(['use-already-closed'])
    // A whole use longer than 24 hours is a typing mistake (our own limit).
    const long = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(26 * 60), backAt: minutesAgo(30), stage: 'alert' })
    expect(long.status).toBe(422)
    expect(long.body.data.rules).toContain('use-implausibly-long')
    const future = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: new Date(Date.now() + 10 * MIN).toISOString(), stage: 'alert' })
    expect(future.body.data.rules).toContain('out-in-future')
    expect(await count('sample_uses', 'sample_id = ?', [FRESH_TARGET])).toBe(1)
  })

  it('a use in an imprinting session throws the sample away (common practice)', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const r = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(4), backAt: minutesAgo(1), stage: 'imprinting' })
    expect(r.status).toBe(201)
    expect(r.body.discards).toBe(true)
    expect(await sampleOf(handler, FRESH_TARGET)).toMatchObject({ status: 'discarded', usesLeft: 0 })
    expect((await query('select discard_reason from samples where id = ?', [FRESH_TARGET]))[0]!.discard_reason).toMatch(/imprinting/)
  })
})

describe('restocking', () => {
  async function discardControls(agent: Agent, indexes: number[]) {
    for (const i of indexes) expect((await agent.post(`/api/samples/${seedId(`sample:fairweather:${i}`)}/discard`, { reason: 'Thawed by accident' })).status).toBe(200)
  }
  const restockMails = async () => (await inbox(mailUrl, HANDLER_A)).filter(m => /Time to collect more/.test(m.subject))

  it('e-mails the handler exactly once when stock runs low within 21 days (common practice), and the trainer sees it on the roster', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const trainer = await signIn(baseUrl, TRAINER_A)
    const before = (await restockMails()).length
    // The demo controls have 15 uses left at 9 uses in 28 days: about 46 days. Three fresh controls thrown away
    // leave 6 uses: 6 × 28 ÷ 9 = 18.7 days, within 21.
    await discardControls(handler, [16, 15])
    expect((await bank(trainer)).forecast.control).toMatchObject({ usesLeft: 9, daysLeft: 28, restockDue: false })
    await discardControls(handler, [14])
    const b = await bank(trainer)
    expect(b.forecast.control).toMatchObject({ usesLeft: 6, daysLeft: 18, restockDue: true })
    expect(b.reminder).toMatchObject({ restockDue: true, episode: 1 })
    await waitForMail(mailUrl, HANDLER_A, 'Time to collect more control')
    const deadline = Date.now() + 10_000
    while ((await restockMails()).length === before && Date.now() < deadline) await new Promise(r => setTimeout(r, 200))
    const mail = (await restockMails()).find(m => m.text.includes('about 18 days'))!
    expect(mail).toBeDefined()
    expect(mail.text).toContain('Fairweather household')
    expect(mail.text).toContain('about 18 days')
    expect(mail.text).toMatch(/biological material/)
    expect(mail.text).toContain(`/handler/samples/${CLIENT_A}/collect`)
    // More changes and page views while still low: no second e-mail.
    await discardControls(handler, [13])
    await collect(handler, { answers: { ...clean, unknown: ['lastAteAt'] } }) // compromised: does not help
    for (let i = 0; i < 3; i++) await bank(handler)
    await new Promise(r => setTimeout(r, 1500)) // several outbox runs (every 250 ms in tests)
    expect((await restockMails()).length).toBe(before + 1)
    // The roster shows it.
    const roster = (await trainer.get('/api/clients?pageSize=50')).body.rows as { id: string, extras: Record<string, any> }[]
    const row = roster.find(r => r.id === CLIENT_A)!
    expect(row.extras.samples).toMatchObject({ restockDue: true, control: { restockDue: true } })
    expect(row.extras.samples.reminderQueuedAt).toEqual(expect.any(String))
  })

  it('a new low spell after restocking is a new episode with one new e-mail', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = (await restockMails()).length
    await discardControls(handler, [16, 15, 14])
    await waitForMail(mailUrl, HANDLER_A, 'Time to collect more control')
    // Three fresh controls bring it back to health…
    for (let i = 0; i < 3; i++) expect((await collect(handler)).status).toBe(201)
    expect((await bank(handler)).reminder).toMatchObject({ restockDue: false, episode: 1 })
    // …and throwing them away again starts episode 2.
    const fresh = (await bank(handler)).samples.filter((s: { kind: string, status: string, usesRecorded: number }) => s.kind === 'control' && s.status === 'usable' && s.usesRecorded === 0)
    for (const s of fresh.slice(0, 3)) await handler.post(`/api/samples/${s.id}/discard`, { reason: 'Freezer failed' })
    expect((await bank(handler)).reminder).toMatchObject({ restockDue: true, episode: 2 })
    const deadline = Date.now() + 10_000
    while ((await restockMails()).length < before + 2 && Date.now() < deadline) await new Promise(r => setTimeout(r, 200))
    expect((await restockMails()).length).toBe(before + 2)
  })

  it('the periodic check catches stock that ran low without a change through the app, and reminds once', async () => {
    const before = (await restockMails()).length
    // As if three fresh controls had been thrown away earlier and the status last checked over an hour ago
    // (samples age and the rate window slides with no request at all).
    const stale = Date.now() - 2 * 60 * MIN
    await query(`update samples set discarded_at = ?, discard_reason = 'Freezer failure' where id in (?, ?, ?)`, [stale, seedId('sample:fairweather:16'), seedId('sample:fairweather:15'), seedId('sample:fairweather:14')])
    await query('update sample_bank_status set checked_at = ? where client_id = ?', [stale, CLIENT_A])
    // The check runs every second in the test stack (SAMPLE_CHECK_INTERVAL_MS in tests/support/stack.ts).
    const deadline = Date.now() + 15_000
    while ((await restockMails()).length === before && Date.now() < deadline) await new Promise(r => setTimeout(r, 200))
    const mails = await restockMails()
    expect(mails.length).toBe(before + 1)
    expect(mails.some(m => m.text.includes('Fairweather household') && /control/.test(m.subject))).toBe(true)
    const [row] = await query('select restock_due, restock_episode, checked_at from sample_bank_status where client_id = ?', [CLIENT_A])
    expect(row).toMatchObject({ restock_due: 1, restock_episode: 1 })
    expect(Number(row!.checked_at)).toBeGreaterThan(stale)
    await new Promise(r => setTimeout(r, 2500)) // more checks (and outbox runs): still one e-mail
    expect((await restockMails()).length).toBe(before + 1)
  })

  it('the demo household already reminded is not e-mailed again, and the roster shows it low', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const b = await bank(trainer, LINDGREN)
    expect(b.forecast.target).toMatchObject({ usesLeft: 2, restockDue: true })
    expect(b.reminder).toMatchObject({ restockDue: true, episode: 1 })
    expect(await count('outbox', "dedupe_key like ? and status = 'sent'", [`sample-restock:${LINDGREN}:1:%`])).toBe(1)
    const admin = await signIn(baseUrl, ADMIN)
    const roster = (await admin.get('/api/clients?pageSize=50')).body.rows as { id: string, extras: Record<string, any> }[]
    expect(roster.find(r => r.id === LINDGREN)!.extras.samples).toMatchObject({ restockDue: true, target: { usesLeft: 2, daysLeft: 8 } })
  })
})

describe('the policy is the admin\'s', () => {
  it('a stricter roll limit set by the admin is enforced at once', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const current = (await admin.get('/api/settings/samples')).body.value
    expect(current).toMatchObject({ maxRollsPerBag: 6, fastingMinutes: 45, restockThresholdDays: 21 }) // common practice
    expect((await admin.request('PUT', '/api/settings/samples', { ...current, maxRollsPerBag: 4 })).status).toBe(200)
    const handler = await signIn(baseUrl, HANDLER_A)
    const r = await collect(handler, { rolls: 5 })
    expect(r.status).toBe(422)
    expect(r.body.message).toMatch(/at most 4 cotton rolls/)
    await query("delete from business_settings where key = 'samples'")
  })
})

describe('second-pass rules through the API', () => {
  // Demo Fairweather targets 19 and 20: collected 95 minutes into a migraine, and after a painkiller.
  const LATE_TARGET = seedId('sample:fairweather:19')
  const MEDICATED_TARGET = seedId('sample:fairweather:20')

  it('a target records medication before collecting; a late one is flagged (60 minutes, common practice)', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const res = await collect(handler, { kind: 'target', firstSymptomsAt: minutesAgo(75), medicationBefore: false })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const s = await sampleOf(handler, res.body.id)
    expect(s).toMatchObject({ medicationBefore: false, timing: { minutesAfterSymptoms: 74, late: true, medicated: false, flagged: true } })
    // A control never carries it; a malformed answer is refused and nothing is written.
    const control = await collect(handler, { medicationBefore: true })
    expect((await sampleOf(handler, control.body.id)).medicationBefore).toBeNull()
    const before = await count('samples')
    const bad = await collect(handler, { kind: 'target', firstSymptomsAt: minutesAgo(5), medicationBefore: 'maybe' })
    expect(bad.status).toBe(422)
    expect(await count('samples')).toBe(before)
  })

  it('the trainer keeps flagged targets out of training: they leave the stock and cannot be used; the household cannot change it', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = await bank(trainer)
    expect(before.samples.find((x: { id: string }) => x.id === LATE_TARGET)).toMatchObject({ state: 'ready', timing: { flagged: true, late: true } })
    expect(before.samples.find((x: { id: string }) => x.id === MEDICATED_TARGET)).toMatchObject({ state: 'ready', timing: { flagged: true, medicated: true } })

    expect((await handler.request('PUT', `/api/clients/${CLIENT_A}/sample-settings`, { excludeFlaggedTargets: true })).status).toBe(403)
    expect((await trainer.request('PUT', `/api/clients/${CLIENT_A}/sample-settings`, { excludeFlaggedTargets: 'yes' })).status).toBe(422)
    const res = await trainer.request('PUT', `/api/clients/${CLIENT_A}/sample-settings`, { excludeFlaggedTargets: true })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toEqual({ clientId: CLIENT_A, excludeFlaggedTargets: true })

    const after = await bank(handler)
    expect(after.samples.find((x: { id: string }) => x.id === LATE_TARGET)).toMatchObject({ state: 'kept-out', list: 'not-for-training', usesLeft: 0, useUntil: null })
    // Two bags of 3 unused uses each leave the stock.
    expect(after.forecast.target.usableSamples).toBe(before.forecast.target.usableSamples - 2)
    expect(after.forecast.target.usesLeft).toBe(before.forecast.target.usesLeft - 6)
    const refused = await handler.post(`/api/samples/${LATE_TARGET}/uses`, { outAt: minutesAgo(0), stage: 'discrimination' })
    expect(refused.status).toBe(422)
    expect(refused.body.data.rules).toEqual(['kept-out'])
    expect(await count('sample_uses', 'sample_id = ?', [LATE_TARGET])).toBe(0)
    expect(await count('audit_log', "action = 'sample-settings.set' and client_id = ?", [CLIENT_A])).toBe(1)
  })

  it('a sample put back after more than 5 minutes is thrown away: that use was its last (common practice)', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const out = await handler.post(`/api/samples/${FRESH_TARGET}/uses`, { outAt: minutesAgo(7), stage: 'discrimination' })
    expect(out.status, JSON.stringify(out.body)).toBe(201)
    const back = await handler.patch(`/api/sample-uses/${out.body.use.id}`, { backAt: minutesAgo(0) })
    expect(back.status, JSON.stringify(back.body)).toBe(200)
    expect(back.body).toMatchObject({ discards: true, use: { overLimit: true, discarded: true } })
    expect(back.body.warnings[0].message).toMatch(/this was its last use/)
    expect(await sampleOf(handler, FRESH_TARGET)).toMatchObject({ status: 'discarded', state: 'discarded', usesLeft: 0, discardReason: 'Out of the freezer longer than 5 minutes: that use was its last.' })
  })

  it('bags not yet in the freezer count in the stock and are listed to finish, and the card says how many', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const b = await bank(handler)
    const toStore = b.samples.filter((x: { state: string }) => x.state === 'to-store')
    expect(toStore.map((x: { id: string }) => x.id).sort()).toEqual([seedId('sample:fairweather:17'), seedId('sample:fairweather:18')].sort())
    expect(toStore.every((x: { list: string, inStock: boolean }) => x.list === 'to-finish' && x.inStock)).toBe(true)
    expect(b.forecast.target.bags.toStore).toBe(2)
    const inStock = b.samples.filter((x: { kind: string, inStock: boolean }) => x.kind === 'target' && x.inStock).length
    expect(b.forecast.target.usableSamples).toBe(inStock)
    expect(b.forecast.target.bags.ready + b.forecast.target.bags.toStore + b.forecast.target.bags.out).toBe(inStock)
  })
})
