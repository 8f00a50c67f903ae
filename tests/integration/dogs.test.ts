import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { ACCEPT_BEFORE_TRAINING, todayInTimeZone } from '../../shared/utils/dogs'
import { signIn, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')

const JUNIPER = seedId('dog:fairweather') // client A's dog, in training
const THISTLE = seedId('dog:achterberg') // client B's dog
// The demo users' time zone is Europe/London: "today" and "the future" are counted there.
const today = () => todayInTimeZone('Europe/London')
const day = (offset: number) => {
  const [y, m, d] = today().split('-').map(Number)
  return new Date(Date.UTC(y!, m! - 1, d! + offset)).toISOString().slice(0, 10)
}
const scores = (over: Record<string, number> = {}) => ({ scentDrive: 4, focus: 4, environmentalConfidence: 4, sociability: 4, startleRecovery: 4, handlerEngagement: 4, ...over })

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try {
    return (await db.execute({ sql, args })).rows
  }
  finally {
    db.close()
  }
}
const count = async (table: string, where = '1=1', args: (string | number)[] = []) => Number((await query(`select count(*) n from ${table} where ${where}`, args))[0]!.n)
const auditActions = async (entityId: string) => (await query('select action, client_id from audit_log where entity_id = ? order by id', [entityId])).map(r => ({ action: r.action, clientId: r.client_id }))

async function newDog(agent: Agent, body: Record<string, unknown> = {}) {
  const res = await agent.post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Bramble', breed: 'Flat-coated Retriever', sex: 'female', dateOfBirth: day(-400), source: 'rescue', ...body })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { id: string, name: string, status: string }
}

beforeEach(async () => { await resetDatabase(databaseUrl) })

describe('adding a dog', () => {
  it('the trainer adds a dog: it starts in assessment with its first status change, and the change is audited on the client', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const dog = await newDog(trainer, { microchip: '999 000 000 020 001', startedOn: day(-3) })
    expect(dog).toMatchObject({ name: 'Bramble', status: 'assessment', microchip: '999000000020001', acceptedOn: null })
    const profile = (await trainer.get(`/api/dogs/${dog.id}`)).body
    expect(profile.statusHistory).toEqual([expect.objectContaining({ status: 'assessment', effectiveOn: day(-3), changedByName: 'Maren Holt' })])
    expect(profile.age).toBe('1 year 1 month')
    expect(profile.canEdit).toBe(true)
    expect(await auditActions(dog.id)).toEqual([{ action: 'dog.added', clientId: CLIENT_A }])
    // It shows on the client's list of dogs.
    const list = (await trainer.get(`/api/clients/${CLIENT_A}/dogs`)).body as { name: string }[]
    expect(list.map(d => d.name)).toEqual(['Juniper', 'Bramble'])
  })

  it('the admin may add one too; the other trainer and the handlers may not', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    expect((await admin.post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Clover' })).status).toBe(201)
    const before = await count('dogs')
    expect((await (await signIn(baseUrl, TRAINER_B)).post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Clover' })).status).toBe(404)
    expect((await (await signIn(baseUrl, HANDLER_B)).post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Clover' })).status).toBe(404)
    expect((await (await signIn(baseUrl, HANDLER_A)).post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Clover' })).status).toBe(403)
    expect(await count('dogs')).toBe(before)
  })

  it('refuses bad input with field errors and writes nothing', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const before = [await count('dogs'), await count('dog_status_changes'), await count('audit_log')]
    const bad = await trainer.post(`/api/clients/${CLIENT_A}/dogs`, { name: ' ', sex: 'unknown', dateOfBirth: '2025-02-30', microchip: '12345', source: 'pet shop' })
    expect(bad.status).toBe(422)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['dateOfBirth', 'microchip', 'name', 'sex', 'source'])
    expect(bad.body.data.fieldErrors.microchip).toMatch(/15 digits/)
    const future = await trainer.post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Clover', dateOfBirth: day(1) })
    expect(future.status).toBe(422)
    expect(future.body.data.fieldErrors.dateOfBirth).toMatch(/future/)
    const startBeforeBirth = await trainer.post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Clover', dateOfBirth: day(-10), startedOn: day(-20) })
    expect(startBeforeBirth.body.data.fieldErrors.startedOn).toMatch(/date of birth/)
    const broken = await trainer.request('POST', `/api/clients/${CLIENT_A}/dogs`, '{"name":', { 'content-type': 'application/json' })
    expect(broken.status).toBe(400)
    // Juniper's chip is 999000000010001 in the demo: a second dog cannot have it.
    const taken = await trainer.post(`/api/clients/${CLIENT_A}/dogs`, { name: 'Clover', microchip: '999000000010001' })
    expect(taken.status).toBe(409)
    expect(taken.body.data.fieldErrors.microchip).toMatch(/Another dog/)
    expect([await count('dogs'), await count('dog_status_changes'), await count('audit_log')]).toEqual(before)
  })
})

describe('editing a dog', () => {
  it('the trainer edits the details; only the fields sent change, and the change is audited', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const res = await trainer.patch(`/api/dogs/${JUNIPER}`, { breed: 'Labrador Retriever (yellow)', microchip: '999-000-000-030-001', notes: 'Loves the scent wall.' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ name: 'Juniper', breed: 'Labrador Retriever (yellow)', microchip: '999000000030001', sex: 'female', source: 'own-dog', status: 'in-training' })
    const cleared = await trainer.patch(`/api/dogs/${JUNIPER}`, { microchip: '' })
    expect(cleared.body.microchip).toBeNull()
    expect((await trainer.get(`/api/dogs/${JUNIPER}`)).body.dog.notes).toBe('Loves the scent wall.')
    const audit = await query(`select action, client_id, data from audit_log where entity_id = ? order by id`, [JUNIPER])
    expect(audit.map(a => a.action)).toEqual(['dog.updated', 'dog.updated'])
    expect(audit[0]!.client_id).toBe(CLIENT_A)
    expect(JSON.parse(String(audit[0]!.data)).fields).toEqual(['breed', 'microchip', 'notes'])
  })

  it('refuses an empty change, the status field, a taken chip and a future birth date, changing nothing', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const before = JSON.stringify((await trainer.get(`/api/dogs/${JUNIPER}`)).body.dog)
    for (const [body, status] of [
      [{}, 422], [{ status: 'placed' }, 422], [{ name: '' }, 422], [{ microchip: '999000000010003' }, 409], [{ dateOfBirth: day(5) }, 422],
    ] as const) {
      const res = await trainer.patch(`/api/dogs/${JUNIPER}`, body)
      expect(res.status, JSON.stringify(body)).toBe(status)
      expect(res.body.message).toBeTruthy()
    }
    expect(JSON.stringify((await trainer.get(`/api/dogs/${JUNIPER}`)).body.dog)).toBe(before)
  })
})

describe('status over time', () => {
  it("keeps a new dog in assessment until an 'accept' assessment, then records the change and updates the dog", async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const dog = await newDog(trainer, { startedOn: day(-10) })
    const refused = await trainer.post(`/api/dogs/${dog.id}/status`, { status: 'in-training', effectiveOn: day(0) })
    expect(refused.status).toBe(422)
    expect(refused.body.data.fieldErrors.status).toBe(ACCEPT_BEFORE_TRAINING)
    expect(refused.body.message).toContain("outcome 'accept'")

    expect((await trainer.post(`/api/dogs/${dog.id}/assessments`, { assessedOn: day(-5), scores: scores({ focus: 3 }), outcome: 'reassess' })).status).toBe(201)
    expect((await trainer.post(`/api/dogs/${dog.id}/status`, { status: 'in-training', effectiveOn: day(0) })).status).toBe(422)

    const accept = await trainer.post(`/api/dogs/${dog.id}/assessments`, { assessedOn: day(-1), scores: scores(), notes: 'Ready.', outcome: 'accept' })
    expect(accept.status).toBe(201)
    expect(accept.body.summary).toMatchObject({ average: 4, anyBelowMinimum: false })
    const ok = await trainer.post(`/api/dogs/${dog.id}/status`, { status: 'in-training', effectiveOn: day(0), note: 'First session booked.' })
    expect(ok.status).toBe(201)
    expect(ok.body.dog).toMatchObject({ status: 'in-training', acceptedOn: day(-1) })
    const profile = (await trainer.get(`/api/dogs/${dog.id}`)).body
    expect(profile.statusHistory.map((c: { status: string }) => c.status)).toEqual(['assessment', 'in-training'])
    expect(profile.statusSince).toBe(day(0))
    expect(profile.assessments.map((a: { outcome: string }) => a.outcome)).toEqual(['accept', 'reassess'])
    expect((await auditActions(dog.id)).map(a => a.action)).toEqual(['dog.added', 'dog-status.recorded'])
    expect(await count('audit_log', "action = 'suitability-assessment.recorded' and client_id = ?", [CLIENT_A])).toBe(2)
  })

  it('refuses a future date, a date before the latest change and the same status, writing nothing', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    // Juniper's history ends with 'in-training' 142 days ago in the demo.
    const latest = (await trainer.get(`/api/dogs/${JUNIPER}`)).body.statusSince as string
    const before = await count('dog_status_changes', 'dog_id = ?', [JUNIPER])
    const future = await trainer.post(`/api/dogs/${JUNIPER}/status`, { status: 'placed', effectiveOn: day(1) })
    expect(future.status).toBe(422)
    expect(future.body.data.fieldErrors.effectiveOn).toMatch(/future/)
    const early = await trainer.post(`/api/dogs/${JUNIPER}/status`, { status: 'placed', effectiveOn: day(-200) })
    expect(early.status).toBe(422)
    expect(early.body.data.fieldErrors.effectiveOn).toContain(`The latest status change is dated ${latest}`)
    const same = await trainer.post(`/api/dogs/${JUNIPER}/status`, { status: 'in-training', effectiveOn: day(0) })
    expect(same.status).toBe(422)
    expect(same.body.data.fieldErrors.status).toMatch(/already/)
    const noDate = await trainer.post(`/api/dogs/${JUNIPER}/status`, { status: 'placed' })
    expect(noDate.body.data.fieldErrors.effectiveOn).toBe('Enter the date of the change.')
    expect(await count('dog_status_changes', 'dog_id = ?', [JUNIPER])).toBe(before)
    expect((await trainer.get(`/api/dogs/${JUNIPER}`)).body.dog.status).toBe('in-training')
    // The same day as the latest change is in order.
    expect((await trainer.post(`/api/dogs/${JUNIPER}/status`, { status: 'withdrawn', effectiveOn: latest })).status).toBe(201)
  })
})

describe('assessments', () => {
  it('needs every trait scored 1-5 and a reason to accept a dog with a weak trait', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const before = await count('dog_assessments')
    const missing = await trainer.post(`/api/dogs/${JUNIPER}/assessments`, { assessedOn: day(0), scores: { scentDrive: 4 }, outcome: 'accept' })
    expect(missing.status).toBe(422)
    expect(missing.body.data.fieldErrors['scores.focus']).toMatch(/Score focus from 1 to 5/)
    const weak = await trainer.post(`/api/dogs/${JUNIPER}/assessments`, { assessedOn: day(0), scores: scores({ sociability: 2 }), outcome: 'accept' })
    expect(weak.body.data.fieldErrors.notes).toMatch(/below 3/)
    const future = await trainer.post(`/api/dogs/${JUNIPER}/assessments`, { assessedOn: day(2), scores: scores(), outcome: 'accept' })
    expect(future.body.data.fieldErrors.assessedOn).toMatch(/future/)
    expect(await count('dog_assessments')).toBe(before)
    const ok = await trainer.post(`/api/dogs/${JUNIPER}/assessments`, { assessedOn: day(0), scores: scores({ sociability: 2 }), notes: 'Shy with strangers; improving.', outcome: 'accept' })
    expect(ok.status).toBe(201)
    expect(ok.body).toMatchObject({ assessorName: 'Maren Holt', summary: { belowMinimum: ['sociability'], lowest: { key: 'sociability', score: 2 } } })
  })
})

describe('health records and their flags', () => {
  it('flags due soon and overdue records, lets a repeat renew the old one, and edits and deletes', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const dog = await newDog(trainer)
    const add = (body: Record<string, unknown>) => trainer.post(`/api/dogs/${dog.id}/health-records`, { kind: 'vaccination', ...body })
    const soon = await add({ name: 'Leptospirosis', doneOn: day(-355), dueOn: day(10) })
    expect(soon.status).toBe(201)
    expect(soon.body).toMatchObject({ state: 'due-soon', daysLeft: 10, superseded: false })
    const late = await add({ kind: 'parasite-treatment', name: 'Worming', doneOn: day(-100), dueOn: day(-10) })
    expect(late.body.state).toBe('overdue')
    expect((await add({ kind: 'health-clearance', name: 'Hip score', doneOn: day(-50) })).body.state).toBe('none')

    let profile = (await trainer.get(`/api/dogs/${dog.id}`)).body
    expect(profile.health).toEqual({ state: 'overdue', overdue: 1, dueSoon: 1, next: { name: 'Worming', dueOn: day(-10) } })
    expect(profile.healthRecords.map((r: { name: string }) => r.name)).toEqual(['Worming', 'Leptospirosis', 'Hip score'])
    const listed = (await trainer.get(`/api/clients/${CLIENT_A}/dogs`)).body as { id: string, health: { state: string } }[]
    expect(listed.find(d => d.id === dog.id)!.health.state).toBe('overdue')
    // The seeded Juniper has a booster due within the 30 days.
    expect(listed.find(d => d.id === JUNIPER)!.health).toMatchObject({ state: 'due-soon', dueSoon: 1, next: { name: 'Leptospirosis booster' } })

    // Worming done again today renews the overdue one.
    expect((await add({ kind: 'parasite-treatment', name: 'worming', doneOn: day(0), dueOn: day(90) })).body.state).toBe('ok')
    profile = (await trainer.get(`/api/dogs/${dog.id}`)).body
    expect(profile.health.state).toBe('due-soon')
    expect(profile.healthRecords.find((r: { id: string }) => r.id === late.body.id)).toMatchObject({ superseded: true, state: 'none' })

    const edited = await trainer.patch(`/api/health-records/${soon.body.id}`, { dueOn: day(200) })
    expect(edited.status).toBe(200)
    expect(edited.body.state).toBe('ok')
    const backwards = await trainer.patch(`/api/health-records/${soon.body.id}`, { dueOn: day(-400) })
    expect(backwards.status).toBe(422)
    expect(backwards.body.data.fieldErrors.dueOn).toContain(day(-355))
    const futureDone = await add({ name: 'Rabies', doneOn: day(3), dueOn: day(400) })
    expect(futureDone.body.data.fieldErrors.doneOn).toMatch(/future/)
    const badKind = await add({ kind: 'grooming', name: '', doneOn: 'yesterday' })
    expect(Object.keys(badKind.body.data.fieldErrors).sort()).toEqual(['doneOn', 'kind', 'name'])

    const del = await trainer.delete(`/api/health-records/${soon.body.id}`)
    expect(del.status).toBe(200)
    expect(del.body.id).toBe(soon.body.id)
    expect(await count('dog_health_records', 'id = ?', [soon.body.id])).toBe(0)
    expect((await trainer.delete(`/api/health-records/${soon.body.id}`)).status).toBe(404)
    const actions = await query(`select action from audit_log where entity_type = 'dog_health_record' and client_id = ? order by id`, [CLIENT_A])
    expect(actions.map(a => a.action)).toEqual(['health-record.added', 'health-record.added', 'health-record.added', 'health-record.added', 'health-record.updated', 'health-record.deleted'])
  })
})

describe('scoping', () => {
  it("the other trainer and the other household get 404 on client A's dog, exactly like a dog that does not exist", async () => {
    const trainerB = await signIn(baseUrl, TRAINER_B)
    const handlerB = await signIn(baseUrl, HANDLER_B)
    const recordA = seedId('dog-health:fairweather:0')
    for (const agent of [trainerB, handlerB]) {
      const res = await agent.get(`/api/dogs/${JUNIPER}`)
      expect(res.status).toBe(404)
      expect(res.body.message).toBe((await agent.get(`/api/dogs/${seedId('dog:nobody')}`)).body.message)
      expect((await agent.get(`/api/clients/${CLIENT_A}/dogs`)).status).toBe(404)
      expect((await agent.patch(`/api/health-records/${recordA}`, { note: 'x' })).status).toBe(404)
      expect((await agent.post(`/api/dogs/${JUNIPER}/status`, { status: 'placed', effectiveOn: day(0) })).status).toBe(404)
    }
    // Each sees their own.
    expect((await trainerB.get(`/api/dogs/${THISTLE}`)).status).toBe(200)
    expect((await handlerB.get(`/api/dogs/${THISTLE}`)).status).toBe(200)
    expect((await handlerB.get(`/api/clients/${CLIENT_B}/dogs`)).body.map((d: { id: string }) => d.id)).toEqual([THISTLE])
  })

  it("the household's handler reads the whole profile but cannot change it", async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const res = await handler.get(`/api/dogs/${JUNIPER}`)
    expect(res.status).toBe(200)
    expect(res.body.canEdit).toBe(false)
    expect(res.body.dog.name).toBe('Juniper')
    expect(res.body.statusHistory.map((c: { status: string }) => c.status)).toEqual(['assessment', 'in-training'])
    expect(res.body.assessments[0].outcome).toBe('accept')
    expect(res.body.healthRecords.length).toBeGreaterThan(0)
    const before = JSON.stringify(res.body.dog)
    expect((await handler.patch(`/api/dogs/${JUNIPER}`, { name: 'Junie' })).status).toBe(403)
    expect((await handler.post(`/api/dogs/${JUNIPER}/status`, { status: 'placed', effectiveOn: day(0) })).status).toBe(403)
    expect((await handler.post(`/api/dogs/${JUNIPER}/health-records`, { kind: 'other', name: 'Bath', doneOn: day(0) })).status).toBe(403)
    expect((await handler.post(`/api/dogs/${JUNIPER}/assessments`, { assessedOn: day(0), scores: scores(), outcome: 'accept' })).status).toBe(403)
    expect((await handler.delete(`/api/health-records/${seedId('dog-health:fairweather:0')}`)).status).toBe(403)
    expect(JSON.stringify((await handler.get(`/api/dogs/${JUNIPER}`)).body.dog)).toBe(before)
  })
})

describe('the demo seed', () => {
  it("gives every demo dog a history ending in its status, and an 'accept' assessment to each dog past assessment", async () => {
    const dogs = await query(`select d.id, d.name, d.status, d.accepted_on,
      (select status from dog_status_changes c where c.dog_id = d.id order by effective_on desc, created_at desc limit 1) last_status,
      (select outcome from dog_assessments a where a.dog_id = d.id order by assessed_on desc, created_at desc limit 1) last_outcome
      from dogs d`)
    expect(dogs.length).toBe(8)
    for (const d of dogs) {
      expect(d.last_status, String(d.name)).toBe(d.status)
      if (d.status !== 'assessment') {
        expect(d.last_outcome, String(d.name)).toBe('accept')
        expect(d.accepted_on, String(d.name)).toBeTruthy()
      }
    }
    const trainer = await signIn(baseUrl, TRAINER_A)
    const basil = (await trainer.get(`/api/dogs/${seedId('dog:moreau')}`)).body
    expect(basil.health.state).toBe('overdue')
  })
})
