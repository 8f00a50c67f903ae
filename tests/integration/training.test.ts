import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { signIn, waitForMail, type Agent } from '../support/http'
import { CLIENT_A, HANDLER_A, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')

const DOG_A = seedId('dog:fairweather')
const DISCRIMINATION = seedId('milestone:fairweather:3')
const ALERT = seedId('milestone:fairweather:4')
const SESSION = seedId('session:fairweather:0')

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const count = async (table: string, where = '1=1', args: (string | number)[] = []) => Number((await query(`select count(*) n from ${table} where ${where}`, args))[0]!.n)
const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10)

async function programme(agent: Agent) {
  const res = await agent.get(`/api/clients/${CLIENT_A}/programme`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  const current = res.body.milestones.find((m: { id: string }) => m.id === res.body.currentId)
  return { body: res.body, current, criteria: Object.fromEntries(current.readiness?.criteria.map((c: { key: string }) => [c.key, c]) ?? []) }
}

/** A blind session of 6 hits (target rotating over 3 stations) and 6 quiet blank trials. */
const cleanTrials = () => [
  ...Array.from({ length: 6 }, (_, i) => ({ stations: 3, targetStation: (i % 3) + 1, indicatedStation: (i % 3) + 1, latencySeconds: 5 })),
  ...Array.from({ length: 6 }, () => ({ stations: 3, targetStation: null, indicatedStation: null })),
]
async function logSession(agent: Agent, body: Record<string, unknown>) {
  return agent.post(`/api/clients/${CLIENT_A}/training-sessions`, { dogId: DOG_A, stage: 'discrimination', blind: true, trials: [], ...body })
}

let trainer: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  trainer = await signIn(baseUrl, TRAINER_A)
})

describe('readiness figures', () => {
  it('start from the seeded log and say what is still needed', async () => {
    const { current, criteria } = await programme(trainer)
    expect(current.name).toBe('Discrimination')
    // Seed: 5 sessions, 30 trials (20 with a target, 19 hits; 10 blank, 9 quiet), 12 of them blind.
    expect(current.readiness.score.counts).toMatchObject({ trials: 30, hits: 19, misses: 1, correctRejections: 9, falseAlerts: 1 })
    expect(criteria.trials).toMatchObject({ met: false, stillNeeded: '10 more trials' })
    expect(criteria.sessions).toMatchObject({ met: false, stillNeeded: '1 more session' })
    expect(criteria.days.met).toBe(true)
    expect(criteria.blind).toMatchObject({ met: false, stillNeeded: '8 more blind trials' })
    expect(criteria.specificity.met).toBe(false)
    expect(current.readiness.allMet).toBe(false)
  })

  it('move as sessions are logged, and the trainer signs off: the handler gets the milestone e-mail', async () => {
    for (const d of [3, 2, 1]) expect((await logSession(trainer, { day: daysAgo(d), trials: cleanTrials() })).status).toBe(201)
    const { current, criteria } = await programme(trainer)
    expect(current.readiness.score.counts).toMatchObject({ trials: 66, hits: 37, correctRejections: 27 })
    expect(criteria.blind.actual).toBe('48 blind trials of 66 (72.7%)')
    expect(current.readiness.criteria.filter((c: { met: boolean }) => !c.met)).toEqual([])
    expect(current.readiness.score.sensitivity.lower).toBeGreaterThanOrEqual(0.8)

    const res = await trainer.post(`/api/client-milestones/${DISCRIMINATION}/confirm`, {})
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.confirmReason).toBeNull()
    const mail = await waitForMail(mailUrl, HANDLER_A, 'Milestone reached: Discrimination')
    expect(mail.text).toContain('picks the target sample out of a line-up')
    expect(mail.text).toContain('What comes next: Trained alert behaviour')
    expect(mail.text).toContain('never replaces it')
    expect((await programme(trainer)).current.name).toBe('Trained alert behaviour')
    // The roster shows the new current milestone.
    const roster = await trainer.get('/api/clients?pageSize=50')
    expect(roster.body.rows.find((r: { id: string }) => r.id === CLIENT_A).extras.training).toMatchObject({ current: 'Trained alert behaviour', done: 4, total: 10 })
  })

  it('a trainer can tighten a client\'s criteria, never loosen them', async () => {
    const strict = { windowDays: 30, minTrials: 80, minSessions: 6, minDays: 4, minBlindPercent: 50, minSensitivityLowerPercent: 80, minSpecificityLowerPercent: 80 }
    expect((await trainer.patch(`/api/client-milestones/${DISCRIMINATION}`, { criteria: strict })).status).toBe(200)
    expect((await programme(trainer)).criteria.trials.stillNeeded).toBe('50 more trials')
    const loose = await trainer.patch(`/api/client-milestones/${DISCRIMINATION}`, { criteria: { ...strict, minTrials: 10 } })
    expect(loose.status).toBe(422)
    expect(loose.body.data.fieldErrors.minTrials).toBe('Use at least 40 (the default).')
    expect((await programme(trainer)).criteria.trials.stillNeeded).toBe('50 more trials')
  })
})

describe('sign-off refused', () => {
  it('with criteria unmet and no written reason: 422 and nothing written', async () => {
    const outbox = await count('outbox')
    const res = await trainer.post(`/api/client-milestones/${DISCRIMINATION}/confirm`, { reason: '  ' })
    expect(res.status).toBe(422)
    expect(res.body.data.fieldErrors.reason).toMatch(/Write why/)
    expect(await count('client_milestones', 'id = ? and confirmed_at is not null', [DISCRIMINATION])).toBe(0)
    expect(await count('outbox')).toBe(outbox)
    // With a reason it goes through, and the reason is kept.
    const ok = await trainer.post(`/api/client-milestones/${DISCRIMINATION}/confirm`, { reason: 'Assessed in person at three venues.' })
    expect(ok.status).toBe(200)
    expect((await query('select confirm_reason from client_milestones where id = ?', [DISCRIMINATION]))[0]!.confirm_reason).toBe('Assessed in person at three venues.')
    expect((await trainer.post(`/api/client-milestones/${DISCRIMINATION}/confirm`, { reason: 'again' })).status).toBe(409)
  })
  it('out of order: 409', async () => {
    const res = await trainer.post(`/api/client-milestones/${ALERT}/confirm`, { reason: 'Skipping ahead.' })
    expect(res.status).toBe(409)
    expect(res.body.message).toContain('"Discrimination" comes first')
  })
})

describe('bad sessions and trials', () => {
  it('a trial at a station that does not exist: 422, no trial written', async () => {
    const before = await count('training_trials')
    const res = await trainer.post(`/api/training-sessions/${SESSION}/trials`, { stations: 3, targetStation: 1, indicatedStation: 5 })
    expect(res.status).toBe(422)
    expect(res.body.data.fieldErrors.indicatedStation).toBe('There is no station 5: this line-up has 3.')
    const inSession = await logSession(trainer, { day: daysAgo(1), trials: [{ stations: 2, targetStation: 3, indicatedStation: null }] })
    expect(inSession.status).toBe(422)
    expect(await count('training_trials')).toBe(before)
    expect(await count('training_sessions', 'day = ?', [daysAgo(1)])).toBe(0)
  })
  it('a session in the future: 422, nothing written', async () => {
    const res = await logSession(trainer, { day: daysAgo(-3), trials: cleanTrials() })
    expect(res.status).toBe(422)
    expect(res.body.data.fieldErrors.day).toMatch(/cannot be after today/)
    expect(await count('training_sessions', 'day = ?', [daysAgo(-3)])).toBe(0)
  })
  it('another trainer\'s dog: 404 on their client, 422 for a dog of another household', async () => {
    const other = await signIn(baseUrl, TRAINER_B)
    expect((await logSession(other, { day: daysAgo(1) })).status).toBe(404)
    expect((await logSession(trainer, { day: daysAgo(1), dogId: seedId('dog:achterberg') })).status).toBe(422)
    expect(await count('training_sessions', 'day = ?', [daysAgo(1)])).toBe(0)
  })
  it('a programme started twice: 409', async () => {
    const res = await trainer.post(`/api/clients/${CLIENT_A}/programme`, { templateId: seedId('template:default') })
    expect(res.status).toBe(409)
    expect(await count('client_milestones', 'client_id = ?', [CLIENT_A])).toBe(10)
  })
})

describe('homework and undo', () => {
  it('a handler logs homework tap by tap, undoes a trial, and the figures follow', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const session = await logSession(handler, { day: daysAgo(0 + 1), blind: false, runBy: 'trainer' })
    expect(session.status).toBe(201)
    expect(session.body.runBy).toBe('handler')
    const a = await handler.post(`/api/training-sessions/${session.body.id}/trials`, { stations: 3, targetStation: 2, indicatedStation: 2 })
    const b = await handler.post(`/api/training-sessions/${session.body.id}/trials`, { stations: 3, targetStation: 2, indicatedStation: 1 })
    expect([a.status, b.status]).toEqual([201, 201])
    expect((await handler.request('DELETE', `/api/training-trials/${b.body.id}`)).status).toBe(200)
    const one = await handler.get(`/api/training-sessions/${session.body.id}`)
    expect(one.body.score.counts).toMatchObject({ trials: 1, hits: 1, wrongStation: 0 })
    expect((await programme(handler)).current.readiness.score.counts.trials).toBe(31)
  })
})

describe('export and templates', () => {
  it('the training log as CSV: one line per trial, outcomes named, spreadsheet formulas defused', async () => {
    expect((await logSession(trainer, { day: daysAgo(1), place: '=HYPERLINK("x")', trials: [{ stations: 3, targetStation: null, indicatedStation: 2 }] })).status).toBe(201)
    const res = await trainer.get(`/api/clients/${CLIENT_A}/training-log.csv`)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toContain('text/csv')
    const lines = String(res.body).trim().split('\r\n')
    expect(lines).toHaveLength(1 + 31)
    const last = lines.at(-1)!
    expect(last).toContain(`${daysAgo(1)},discrimination,"'=HYPERLINK(""x"")",trainer,yes,1,3,blank,2,false alert`)
    expect(lines.filter(l => l.includes(',hit,')).length).toBe(19)
  })
  it('the admin edits a template; a bad template is refused with nothing written', async () => {
    const admin = await signIn(baseUrl, 'admin@forescent.test')
    const bad = await admin.request('PUT', `/api/programme-templates/${seedId('template:default')}`, { name: 'Empty', milestones: [] })
    expect(bad.status).toBe(422)
    expect(bad.body.data.fieldErrors.milestones).toBe('A programme has at least one milestone.')
    expect((await query('select name from programme_templates'))[0]!.name).toBe('Standard scent-alert programme')
    // Existing programmes keep their copy.
    const ok = await admin.request('PUT', `/api/programme-templates/${seedId('template:default')}`, { name: 'Renamed', milestones: [{ name: 'Only one', handlerText: 'A single step.' }] })
    expect(ok.status).toBe(200)
    expect(await count('client_milestones', 'client_id = ?', [CLIENT_A])).toBe(10)
  })
})

describe('samples used in a session', () => {
  it('go through the sample bank\'s use API with the session as reference; an imprinting use throws the sample away', async () => {
    const session = await logSession(trainer, { day: daysAgo(1), stage: 'imprinting' })
    expect(session.status).toBe(201)
    const bank = await trainer.get(`/api/clients/${CLIENT_A}/samples`)
    const sample = bank.body.samples.find((x: { status: string, kind: string, openUse: unknown }) => x.status === 'usable' && x.kind === 'target' && !x.openUse)
    expect(sample, 'a usable target sample in the seeded bank').toBeTruthy()
    const outAt = new Date(Date.now() - 20 * 60_000).toISOString()
    const use = await trainer.post(`/api/samples/${sample.id}/uses`, { outAt, backAt: new Date(Date.now() - 5 * 60_000).toISOString(), stage: 'imprinting', sessionRef: session.body.id })
    expect(use.status, JSON.stringify(use.body)).toBe(201)
    expect(use.body.discards).toBe(true) // single use in imprinting (sample bank policy)
    const list = await trainer.get(`/api/clients/${CLIENT_A}/training-sessions`)
    const row = list.body.rows.find((r: { id: string }) => r.id === session.body.id)
    expect(row.samples).toEqual([{ bagCode: sample.bagCode, kind: 'target' }])
    expect(await count('samples', 'id = ? and discarded_at is not null', [sample.id])).toBe(1)
  })
})
