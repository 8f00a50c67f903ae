import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { Agent, signIn, waitForMail, inbox } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_A_ID, HANDLER_B, TRAINER_A, TRAINER_A_ID, TRAINER_B, TRAINER_B_ID, TRAINER3_ID } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')

async function countRows(table: string, where = '1=1', args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  const n = Number((await db.execute({ sql: `select count(*) from ${table} where ${where}`, args })).rows[0]![0])
  db.close()
  return n
}

const intake = {
  householdName: 'Rivers household', personName: 'Kit Rivers', condition: 'hypoglycaemia', conditionDetail: 'Type 1 diabetes',
  earlySigns: 'Goes quiet and pale', episodeFrequency: 'Twice a week', usualOnset: 'Night', phone: '01632 960999', town: 'Ashcombe',
}

beforeEach(async () => { await resetDatabase(databaseUrl) })

describe('intake', () => {
  it('a trainer creates a client file for themself and invites the handler in one step', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const res = await trainer.post('/api/clients', { ...intake, handlerName: 'Sam Rivers', handlerEmail: 'sam.rivers@example.test', handlerRelationship: 'parent' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ householdName: 'Rivers household', trainerId: TRAINER_A_ID, status: 'intake', condition: 'hypoglycaemia' })
    const file = await trainer.get(`/api/clients/${res.body.id}`)
    expect(file.body.pendingInvitations).toEqual([expect.objectContaining({ email: 'sam.rivers@example.test', name: 'Sam Rivers' })])
    const mail = await waitForMail(mailUrl, 'sam.rivers@example.test', 'Rivers household')
    expect(mail.text).toContain('/invitation/')
    // It appears on the trainer's roster, not on the other trainer's.
    expect((await trainer.get('/api/clients?q=Rivers')).body.total).toBe(1)
    expect((await (await signIn(baseUrl, TRAINER_B)).get('/api/clients?q=Rivers')).body.total).toBe(0)
    const activity = await trainer.get(`/api/clients/${res.body.id}/activity`)
    expect(activity.body.items.map((i: { action: string }) => i.action)).toEqual(['invitation.created', 'client.created'])
  })

  it('the admin must choose an active trainer', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const none = await admin.post('/api/clients', { ...intake, inviteHandler: false })
    expect(none.status).toBe(422)
    expect(none.body.data.fieldErrors.trainerId).toMatch(/trainer/)
    const notTrainer = await admin.post('/api/clients', { ...intake, inviteHandler: false, trainerId: HANDLER_A_ID })
    expect(notTrainer.status).toBe(422)
    const ok = await admin.post('/api/clients', { ...intake, inviteHandler: false, trainerId: TRAINER3_ID })
    expect(ok.status).toBe(201)
    expect(ok.body.trainerId).toBe(TRAINER3_ID)
  })

  it('refuses bad input with field errors and writes nothing, even when the handler part fails late', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const before = await countRows('clients')
    const missing = await trainer.post('/api/clients', { householdName: '', condition: 'flu' })
    expect(missing.status).toBe(422)
    expect(Object.keys(missing.body.data.fieldErrors)).toEqual(expect.arrayContaining(['householdName', 'personName', 'condition']))
    const noHandler = await trainer.post('/api/clients', { ...intake })
    expect(Object.keys(noHandler.body.data.fieldErrors).sort()).toEqual(['handlerEmail', 'handlerName'])
    const long = await trainer.post('/api/clients', { ...intake, inviteHandler: false, earlySigns: 'x'.repeat(5000) })
    expect(long.status).toBe(422)
    // A staff e-mail cannot be invited as a handler: the whole intake rolls back.
    const staff = await trainer.post('/api/clients', { ...intake, handlerName: 'Not Allowed', handlerEmail: TRAINER_B })
    expect(staff.status).toBe(409)
    expect(await countRows('clients')).toBe(before)
    expect(await countRows('outbox', 'to_address = ?', [TRAINER_B])).toBe(0)
  })
})

describe('editing the file', () => {
  it('the trainer edits the file and the change is recorded; the handler cannot', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const res = await trainer.patch(`/api/clients/${CLIENT_A}`, { status: 'placed', earlySigns: 'Yawning, then light sensitivity' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ status: 'placed', earlySigns: 'Yawning, then light sensitivity' })
    const activity = await trainer.get(`/api/clients/${CLIENT_A}/activity`)
    expect(activity.body.items[0]).toMatchObject({ action: 'client.updated', data: { fields: ['earlySigns', 'status'], from: 'active', to: 'placed' }, actorName: 'Maren Holt' })
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.patch(`/api/clients/${CLIENT_A}`, { status: 'closed' })).status).toBe(403)
    expect((await handler.get(`/api/clients/${CLIENT_A}/activity`)).status).toBe(403)
    expect((await trainer.patch(`/api/clients/${CLIENT_A}`, { programmeStartedOn: '2026-02-30' })).status).toBe(422)
  })

  it('a handler updates the household contact details, but not another household\'s', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const res = await handler.patch(`/api/clients/${CLIENT_A}/contact`, { phone: '+44 1632 960000', town: 'Fenwick Cross' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ phone: '+44 1632 960000', town: 'Fenwick Cross' })
    expect((await handler.patch(`/api/clients/${CLIENT_B}/contact`, { phone: '1' })).status).toBe(404)
    const bad = await handler.patch(`/api/clients/${CLIENT_A}/contact`, { phone: 'call me', email: 'nope' })
    expect(bad.status).toBe(422)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['email', 'phone'])
    // The handler does not see the trainer's private notes.
    await (await signIn(baseUrl, TRAINER_A)).patch(`/api/clients/${CLIENT_A}`, { notes: 'Private trainer note' })
    expect((await handler.get(`/api/clients/${CLIENT_A}`)).body.client.notes).toBeNull()
  })

  it('removing a handler takes the file away from them at once', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.get(`/api/clients/${CLIENT_A}`)).status).toBe(200)
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect((await trainer.delete(`/api/clients/${CLIENT_A}/handlers/${HANDLER_A_ID}`)).status).toBe(200)
    expect((await handler.get(`/api/clients/${CLIENT_A}`)).status).toBe(404)
    expect((await handler.get('/api/clients')).body.total).toBe(0)
    expect((await trainer.delete(`/api/clients/${CLIENT_A}/handlers/${HANDLER_A_ID}`)).status).toBe(404)
  })
})

describe('reassigning a client', () => {
  it('moves the file to the new trainer and tells both trainers and the handler', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const res = await admin.post(`/api/clients/${CLIENT_A}/reassign`, { trainerId: TRAINER3_ID, note: 'Closer to home' })
    expect(res.status).toBe(200)
    expect(res.body.trainerId).toBe(TRAINER3_ID)
    expect((await (await signIn(baseUrl, TRAINER_A)).get(`/api/clients/${CLIENT_A}`)).status).toBe(404)
    await waitForMail(mailUrl, 'ines.okoro@larkspur.test', 'now on your roster')
    await waitForMail(mailUrl, TRAINER_A, 'has moved to Ines Okoro')
    const toHandler = await waitForMail(mailUrl, HANDLER_A, 'Your trainer is now Ines Okoro')
    expect(toHandler.text).toContain('Fairweather household')
    expect((await inbox(mailUrl, HANDLER_A)).filter(m => m.subject.includes('Your trainer is now')).length).toBe(1)
    expect((await admin.post(`/api/clients/${CLIENT_A}/reassign`, { trainerId: TRAINER3_ID })).status).toBe(422)
    expect((await admin.post(`/api/clients/${CLIENT_A}/reassign`, { trainerId: 'no-such-trainer' })).status).toBe(422)
    expect((await admin.post('/api/clients/no-such-client/reassign', { trainerId: TRAINER3_ID })).status).toBe(404)
  })
})

describe('the roster query', () => {
  it('sorts, filters, searches by dog and pages on the server', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const all = await admin.get('/api/clients?sort=household&dir=desc&pageSize=5')
    expect(all.body.total).toBe(8)
    expect(all.body.rows).toHaveLength(5)
    const names = all.body.rows.map((r: { householdName: string }) => r.householdName)
    expect(names).toEqual([...names].sort().reverse())
    const page2 = await admin.get('/api/clients?sort=household&dir=desc&pageSize=5&page=2')
    expect(page2.body.rows).toHaveLength(3)
    expect((await admin.get('/api/clients?q=Juniper')).body.rows.map((r: { dogName: string }) => r.dogName)).toEqual(['Juniper'])
    expect((await admin.get('/api/clients?condition=seizure')).body.total).toBe(2)
    expect((await admin.get(`/api/clients?trainerId=${TRAINER_A_ID}`)).body.total).toBe(4)
    expect((await admin.get('/api/clients?q=100%25')).body.total).toBe(0)
    expect((await admin.get('/api/clients?sort=dog&dir=asc&pageSize=200')).body.rows[0].dogName).toBe('Basil')
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect((await trainer.get(`/api/clients?trainerId=${TRAINER_B_ID}`)).body.total).toBe(0)
  })
})


describe('a handler already on Forescent joins a second household', () => {
  it('keeps their password: accepting asks for it and adds the household', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect((await trainer.post('/api/invitations', { role: 'handler', clientId: CLIENT_A, email: HANDLER_B, name: 'Ruth Achterberg', relationship: 'carer' })).status).toBe(201)
    const mail = await waitForMail(mailUrl, HANDLER_B, 'Fairweather household')
    const token = mail.text.match(/\/invitation\/([\w-]+)/)![1]!
    const anon = new Agent(baseUrl)
    expect((await anon.get(`/api/invitations/${token}`)).body).toMatchObject({ email: HANDLER_B, hasAccount: true })
    const wrong = await anon.post(`/api/invitations/${token}/accept`, { password: 'some-other-password' })
    expect(wrong.status).toBe(422)
    expect(wrong.body.data.fieldErrors.password).toBeTruthy()
    const ok = await anon.post(`/api/invitations/${token}/accept`, { password: 'forescent-demo' })
    expect(ok.status).toBe(200)
    const ids = (await anon.get('/api/clients')).body.rows.map((r: { id: string }) => r.id).sort()
    expect(ids).toEqual([CLIENT_A, CLIENT_B].sort())
    // The old password still signs in.
    expect((await signIn(baseUrl, HANDLER_B)).cookie).toBeTruthy()
  })
})
