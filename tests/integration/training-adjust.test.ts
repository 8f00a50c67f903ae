// Adjusting a client's programme, readiness in the roster, the session list across clients, a dog's reliability,
// and trials sent twice (the pad's retry queue) stored once.
import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { signIn, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')

const DOG_A = seedId('dog:fairweather')
const DOG_B = seedId('dog:achterberg')
const INTAKE = seedId('milestone:fairweather:0')
const DISCRIMINATION = seedId('milestone:fairweather:3')
const ALERT = seedId('milestone:fairweather:4')
const GENERALISATION = seedId('milestone:fairweather:5')
const SESSION_A = seedId('session:fairweather:0')
const SESSION_B = seedId('session:achterberg:0')

async function query(sql: string, args: (string | number | null)[] = []) {
  const db = libsql({ url: databaseUrl })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const count = async (table: string, where = '1=1', args: (string | number)[] = []) => Number((await query(`select count(*) n from ${table} where ${where}`, args))[0]!.n)
const names = async (clientId = CLIENT_A) => (await query('select name from client_milestones where client_id = ? order by position', [clientId])).map(r => String(r.name))
const positions = async (clientId = CLIENT_A) => (await query('select position from client_milestones where client_id = ? order by position', [clientId])).map(r => Number(r.position))
const audits = (action: string) => count('audit_log', 'action = ?', [action])
const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10)
const DEFAULT_NAMES = ['Intake and suitability', 'Sample bank ready', 'Imprinting', 'Discrimination', 'Trained alert behaviour', 'Generalisation to new places and distractions', 'Real-life alerts', 'Public access readiness', 'Placement', 'Aftercare and yearly re-check']

let trainer: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  trainer = await signIn(baseUrl, TRAINER_A)
})

describe('adjusting a client\'s programme', () => {
  it('renames a milestone and rewords its text for the handler; audited; the handler sees it', async () => {
    const res = await trainer.patch(`/api/client-milestones/${ALERT}`, { name: 'Trained alert: paw nudge', handlerText: 'Your dog nudges your knee with a paw on the target, and not otherwise.' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ name: 'Trained alert: paw nudge', position: 4 })
    expect(await audits('milestone.renamed')).toBe(1)
    expect(await audits('milestone.text-edited')).toBe(1)
    const handler = await signIn(baseUrl, HANDLER_A)
    const prog = await handler.get(`/api/clients/${CLIENT_A}/programme`)
    expect(prog.body.milestones[4]).toMatchObject({ name: 'Trained alert: paw nudge', handlerText: 'Your dog nudges your knee with a paw on the target, and not otherwise.' })
  })

  it('refuses to change a signed-off milestone, a too-short name, or an empty change: nothing written', async () => {
    const signed = await trainer.patch(`/api/client-milestones/${INTAKE}`, { name: 'Intake' })
    expect(signed.status).toBe(409)
    expect(signed.body.message).toContain('signed off')
    const short = await trainer.patch(`/api/client-milestones/${ALERT}`, { name: 'x' })
    expect(short.status).toBe(422)
    expect(short.body.data.fieldErrors.name).toBe('Name the milestone (at least 2 characters).')
    expect((await trainer.patch(`/api/client-milestones/${ALERT}`, {})).status).toBe(422)
    expect(await names()).toEqual(DEFAULT_NAMES)
    expect(await audits('milestone.renamed')).toBe(0)
  })

  it('adds a milestone at a place after the signed-off ones; positions stay unique and gap-free', async () => {
    const res = await trainer.post(`/api/clients/${CLIENT_A}/milestones`, { name: 'Alerts in the car', handlerText: 'Your dog alerts just as well on car journeys.', measured: true, position: 5 })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.position).toBe(5)
    expect(await names()).toEqual([...DEFAULT_NAMES.slice(0, 5), 'Alerts in the car', ...DEFAULT_NAMES.slice(5)])
    expect(await positions()).toEqual([...Array(11).keys()])
    expect(await audits('milestone.added')).toBe(1)
    // The new one is measured with the business's defaults: it shows readiness once it is current.
    const prog = await trainer.get(`/api/clients/${CLIENT_A}/programme`)
    expect(prog.body.milestones[5]).toMatchObject({ name: 'Alerts in the car', measured: true, customCriteria: false })
  })

  it('refuses a milestone before the signed-off ones, or with no text: 422, nothing written', async () => {
    const early = await trainer.post(`/api/clients/${CLIENT_A}/milestones`, { name: 'Early step', handlerText: 'Something before intake.', position: 1 })
    expect(early.status).toBe(422)
    expect(early.body.data.fieldErrors.position).toBe('Signed-off milestones stay first: put the new one at place 4 to 11.')
    const noText = await trainer.post(`/api/clients/${CLIENT_A}/milestones`, { name: 'Early step', position: 4 })
    expect(noText.status).toBe(422)
    expect(noText.body.data.fieldErrors.handlerText).toBe('Describe the milestone for the handler.')
    expect(await count('client_milestones', 'client_id = ?', [CLIENT_A])).toBe(10)
    expect(await positions()).toEqual([...Array(10).keys()])
  })

  it('removes a milestone still to come and closes the gap; refuses a signed-off one and one with homework set for it', async () => {
    const res = await trainer.request('DELETE', `/api/client-milestones/${GENERALISATION}`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(await names()).toEqual(DEFAULT_NAMES.filter(n => !n.startsWith('Generalisation')))
    expect(await positions()).toEqual([...Array(9).keys()])
    expect(await audits('milestone.removed')).toBe(1)

    const signed = await trainer.request('DELETE', `/api/client-milestones/${INTAKE}`)
    expect(signed.status).toBe(409)
    expect(signed.body.message).toContain('signed off')

    await query(`insert into homework_assignments (id, client_id, milestone_id, title, instructions, due_day) values ('hw-test', ?, ?, 'Blind line-ups at home', 'Three blind line-ups a day.', ?)`, [CLIENT_A, ALERT, daysAgo(-7)])
    const dependent = await trainer.request('DELETE', `/api/client-milestones/${ALERT}`)
    expect(dependent.status).toBe(409)
    expect(dependent.body.message).toBe('Homework is set for "Trained alert behaviour" (1 assignment). Move or cancel that homework first, or rename the milestone instead.')
    expect(await count('client_milestones', 'id in (?, ?)', [INTAKE, ALERT])).toBe(2)
    expect(await count('client_milestones', 'client_id = ?', [CLIENT_A])).toBe(9)
  })

  it('reorders the milestones still to come; sign-off then follows the new order', async () => {
    const open = (await query('select id from client_milestones where client_id = ? and confirmed_at is null order by position', [CLIENT_A])).map(r => String(r.id))
    expect(open[0]).toBe(DISCRIMINATION)
    const ids = [ALERT, DISCRIMINATION, ...open.slice(2)]
    const res = await trainer.request('PUT', `/api/clients/${CLIENT_A}/milestone-order`, { ids })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.moved).toBe(2)
    expect((await names()).slice(3, 5)).toEqual(['Trained alert behaviour', 'Discrimination'])
    expect(await positions()).toEqual([...Array(10).keys()])
    expect(await audits('programme.reordered')).toBe(1)
    const prog = await trainer.get(`/api/clients/${CLIENT_A}/programme`)
    expect(prog.body.currentId).toBe(ALERT)
    const outOfOrder = await trainer.post(`/api/client-milestones/${DISCRIMINATION}/confirm`, { reason: 'Seen in person.' })
    expect(outOfOrder.status).toBe(409)
    expect(outOfOrder.body.message).toContain('"Trained alert behaviour" comes first')
  })

  it('refuses an order that moves a signed-off milestone or leaves one out: 409, nothing moved', async () => {
    const open = (await query('select id from client_milestones where client_id = ? and confirmed_at is null order by position', [CLIENT_A])).map(r => String(r.id))
    const withSigned = await trainer.request('PUT', `/api/clients/${CLIENT_A}/milestone-order`, { ids: [INTAKE, ...open] })
    expect(withSigned.status).toBe(409)
    expect(withSigned.body.message).toContain('stay first')
    const missing = await trainer.request('PUT', `/api/clients/${CLIENT_A}/milestone-order`, { ids: open.slice(1) })
    expect(missing.status).toBe(409)
    const twice = await trainer.request('PUT', `/api/clients/${CLIENT_A}/milestone-order`, { ids: [open[0], ...open] })
    expect(twice.status).toBe(422)
    expect(await names()).toEqual(DEFAULT_NAMES)
  })

  it('is the trainer\'s and the admin\'s: another trainer gets 404, the handler 403, nothing written', async () => {
    const other = await signIn(baseUrl, TRAINER_B)
    expect((await other.patch(`/api/client-milestones/${ALERT}`, { name: 'Hijacked' })).status).toBe(404)
    expect((await other.request('DELETE', `/api/client-milestones/${ALERT}`)).status).toBe(404)
    expect((await other.post(`/api/clients/${CLIENT_A}/milestones`, { name: 'Extra', handlerText: 'Another step.', position: 5 })).status).toBe(404)
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.request('DELETE', `/api/client-milestones/${ALERT}`)).status).toBe(403)
    expect((await handler.post(`/api/clients/${CLIENT_A}/milestones`, { name: 'Extra', handlerText: 'Another step.', position: 5 })).status).toBe(403)
    expect(await names()).toEqual(DEFAULT_NAMES)
    const admin = await signIn(baseUrl, ADMIN)
    expect((await admin.request('DELETE', `/api/client-milestones/${ALERT}`)).status).toBe(200)
  })
})

describe('readiness in the roster column', () => {
  it('shows the current measured milestone as not yet, with the first thing still needed, and ready once the criteria hold', async () => {
    const roster = await trainer.get('/api/clients?pageSize=50')
    expect(roster.status).toBe(200)
    const value = (body: { rows: { id: string, extras: Record<string, unknown> }[] }, id = CLIENT_A) => body.rows.find(r => r.id === id)!.extras.training
    // Seed: 30 trials of the 40 needed (see training.test.ts).
    expect(value(roster.body)).toEqual({ current: 'Discrimination', done: 3, total: 10, readiness: 'not yet', stillNeeded: '10 more trials', unmet: 5 })
    const clean = [
      ...Array.from({ length: 6 }, (_, i) => ({ stations: 3, targetStation: (i % 3) + 1, indicatedStation: (i % 3) + 1 })),
      ...Array.from({ length: 6 }, () => ({ stations: 3, targetStation: null, indicatedStation: null })),
    ]
    for (const d of [3, 2, 1]) expect((await trainer.post(`/api/clients/${CLIENT_A}/training-sessions`, { dogId: DOG_A, day: daysAgo(d), stage: 'discrimination', blind: true, trials: clean })).status).toBe(201)
    expect(value((await trainer.get('/api/clients?pageSize=50')).body)).toMatchObject({ current: 'Discrimination', readiness: 'ready', stillNeeded: null, unmet: 0 })
    // A milestone not measured on trials is 'unmeasured'.
    expect((await trainer.post(`/api/client-milestones/${DISCRIMINATION}/confirm`, {})).status).toBe(200)
    const open = (await query('select id from client_milestones where client_id = ? and confirmed_at is null order by position', [CLIENT_A])).map(r => String(r.id))
    const unmeasured = open.find(id => id === seedId('milestone:fairweather:6'))!
    expect((await trainer.request('PUT', `/api/clients/${CLIENT_A}/milestone-order`, { ids: [unmeasured, ...open.filter(id => id !== unmeasured)] })).status).toBe(200)
    expect(value((await trainer.get('/api/clients?pageSize=50')).body)).toMatchObject({ current: 'Real-life alerts', readiness: 'unmeasured', stillNeeded: null })
  })
})

describe('the session list across clients', () => {
  it('lists the trainer\'s own sessions with counts, filtered and paged on the server', async () => {
    const res = await trainer.get('/api/training-sessions?pageSize=5')
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.total).toBe(5) // the five Fairweather sessions; Achterberg is trainer B's
    expect(res.body.rows.every((r: { clientId: string }) => r.clientId === CLIENT_A)).toBe(true)
    expect(res.body.rows.map((r: { day: string }) => r.day)).toEqual([...res.body.rows.map((r: { day: string }) => r.day)].sort().reverse())
    // Seed session 2 (12 days ago): H H C H F H → 4 hits, 1 correct rejection, 1 false alert.
    expect(res.body.rows.find((r: { day: string }) => r.day === daysAgo(12))).toMatchObject({ trials: 6, hits: 4, misses: 0, falseAlerts: 1, correctRejections: 1, blind: true, runBy: 'trainer', householdName: 'Fairweather household', dogId: DOG_A })
    expect((await trainer.get('/api/training-sessions?blind=yes')).body.total).toBe(2)
    expect((await trainer.get('/api/training-sessions?runBy=handler')).body.total).toBe(2)
    expect((await trainer.get(`/api/training-sessions?from=${daysAgo(13)}&to=${daysAgo(5)}`)).body.total).toBe(2)
    expect((await trainer.get('/api/training-sessions?q=Village')).body.total).toBe(1)
    expect((await trainer.get(`/api/training-sessions?dogId=${DOG_B}`)).body.total).toBe(0)
    const page2 = await trainer.get('/api/training-sessions?pageSize=5&page=2')
    expect(page2.body.rows).toEqual([])
  })
  it('gives the admin every client\'s sessions and refuses a bad filter with 400', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    expect((await admin.get('/api/training-sessions')).body.total).toBe(6)
    expect((await admin.get(`/api/training-sessions?clientId=${CLIENT_B}`)).body.rows[0]).toMatchObject({ id: SESSION_B, trials: 4, hits: 2, misses: 1, correctRejections: 1 })
    const bad = await admin.get(`/api/training-sessions?from=${daysAgo(1)}&to=${daysAgo(5)}`)
    expect(bad.status).toBe(400)
    expect(bad.body.message).toContain('The end date must be on or after the start date.')
    expect((await admin.get('/api/training-sessions?blind=maybe')).status).toBe(400)
    expect((await admin.get('/api/training-sessions?from=2026-02-30')).status).toBe(400)
  })
})

describe('a dog\'s reliability', () => {
  it('scores all its sessions, blind or not, and per stage', async () => {
    expect((await trainer.post(`/api/clients/${CLIENT_A}/training-sessions`, { dogId: DOG_A, day: daysAgo(1), stage: 'alert', blind: true, trials: [{ stations: 2, targetStation: 1, indicatedStation: 1 }, { stations: 2, targetStation: null, indicatedStation: 2 }] })).status).toBe(201)
    const res = await trainer.get(`/api/dogs/${DOG_A}/reliability`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const r = res.body.reliability
    expect(r.overall.counts).toMatchObject({ trials: 32, hits: 20, misses: 1, falseAlerts: 2, correctRejections: 9 })
    // Blind: seed sessions 2 and 4 (12 trials) and the one above.
    expect(r.blind.counts.trials).toBe(14)
    expect(r.notBlind.counts.trials).toBe(18)
    expect(r.byStage.map((s: { stage: string, sessions: number }) => [s.stage, s.sessions])).toEqual([['discrimination', 5], ['alert', 1]])
    expect(r.overall.sensitivity.lower).toBeLessThan(r.overall.sensitivity.estimate)
    expect(res.body.sessions).toHaveLength(6)
    expect((await (await signIn(baseUrl, TRAINER_B)).get(`/api/dogs/${DOG_A}/reliability`)).status).toBe(404)
  })
})

describe('trials sent twice (retry queue, reload)', () => {
  it('are stored once: the replay answers 200 with the stored row', async () => {
    const before = await count('training_trials', 'session_id = ?', [SESSION_A])
    const trial = { stations: 3, targetStation: 2, indicatedStation: 2, entryKey: 'pad-2f1c9a7e-0001' }
    const first = await trainer.post(`/api/training-sessions/${SESSION_A}/trials`, trial)
    expect(first.status).toBe(201)
    const again = await trainer.post(`/api/training-sessions/${SESSION_A}/trials`, trial)
    expect(again.status).toBe(200)
    expect(again.body.id).toBe(first.body.id)
    expect(await count('training_trials', 'session_id = ?', [SESSION_A])).toBe(before + 1)
    // The same key with another outcome is a different trial: refused, nothing written.
    const clash = await trainer.post(`/api/training-sessions/${SESSION_A}/trials`, { ...trial, indicatedStation: null })
    expect(clash.status).toBe(409)
    expect(await count('training_trials', 'session_id = ?', [SESSION_A])).toBe(before + 1)
    // Two trials sharing a key in one session body: 422, no session written.
    const dup = await trainer.post(`/api/clients/${CLIENT_A}/training-sessions`, { dogId: DOG_A, day: daysAgo(1), stage: 'discrimination', blind: false, trials: [trial, trial] })
    expect(dup.status).toBe(422)
    expect(dup.body.data.fieldErrors.trials).toBe('Each trial needs its own key: two trials share one.')
    expect(await count('training_sessions', 'day = ?', [daysAgo(1)])).toBe(0)
    expect((await trainer.post(`/api/training-sessions/${SESSION_A}/trials`, { ...trial, entryKey: 'bad key!' })).status).toBe(422)
  })
})

describe('bad input on trials', () => {
  it('a trial on another trainer\'s session: 404 and nothing written', async () => {
    const before = await count('training_trials')
    const res = await trainer.post(`/api/training-sessions/${SESSION_B}/trials`, { stations: 3, targetStation: 1, indicatedStation: 1 })
    expect(res.status).toBe(404)
    expect((await trainer.request('DELETE', `/api/training-trials/${seedId('trial:achterberg:0:0')}`)).status).toBe(404)
    expect(await count('training_trials')).toBe(before)
  })
})
