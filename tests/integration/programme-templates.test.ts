// Several programmes: the office creates, duplicates (with fees), renames and archives templates (clients on an
// archived one keep it; it is offered for no new programme); starting a programme previews its billing first and
// may leave billing to the office.
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { signIn, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, TRAINER_A, TRAINER_B } from '../support/people'
import { sqlRows } from '../support/db'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')
const DEFAULT = seedId('template:default')
const LINDGREN = seedId('client:lindgren') // trainer A's client, no programme yet
const BRENNAN = seedId('client:brennan') // trainer B's client at intake, no programme, no invoices

const query = (sql: string, args: (string | number)[] = []) => sqlRows<Record<string, unknown>>(databaseUrl, sql, args)
let admin: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  admin = await signIn(baseUrl, ADMIN)
})

describe('programme templates', () => {
  it('creates, duplicates with its fee schedule, renames and archives; clients on it keep it', async () => {
    const created = await admin.post('/api/programme-templates', { name: 'Night-time alert programme', milestones: [{ name: 'Intake', handlerText: 'Getting to know you and your dog.', measured: false }] })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    const copy = await admin.post(`/api/programme-templates/${DEFAULT}/duplicate`)
    expect(copy.status).toBe(201)
    expect(copy.body.name).toMatch(/\(copy\)$/)
    const fees = (await admin.get('/api/fee-schedules')).body.rows.find((r: any) => r.id === copy.body.id)
    expect(fees.schedule).toMatchObject({ depositMinor: 60000, instalmentCount: 6 })
    const renamed = await admin.request('PUT', `/api/programme-templates/${copy.body.id}`, { name: 'Seizure-alert programme', milestones: copy.body.milestones })
    expect(renamed.body.name).toBe('Seizure-alert programme')

    // Archiving the default while Fairweather is mid-programme on it is allowed: she keeps it.
    const archived = await admin.post(`/api/programme-templates/${DEFAULT}/archive`, { archived: true })
    expect(archived.status).toBe(200)
    expect(archived.body.clientsUsing).toBeGreaterThan(0)
    expect((await query('select programme_template_id from clients where id = ?', [CLIENT_A]))[0]!.programme_template_id).toBe(DEFAULT)
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect(((await trainer.get(`/api/clients/${CLIENT_A}/programme`)).body.milestones as any[]).length).toBe(10)
    const offered = (await trainer.get('/api/programme-templates')).body.rows.map((r: any) => r.id)
    expect(offered).not.toContain(DEFAULT)
    expect(offered).toContain(copy.body.id)
    expect((await admin.get('/api/programme-templates?archived=1')).body.rows.map((r: any) => r.id)).toContain(DEFAULT)
    const refused = await trainer.post(`/api/clients/${LINDGREN}/programme`, { templateId: DEFAULT })
    expect(refused.status).toBe(422)
    expect(refused.body.message).toMatch(/archived/)
    expect((await admin.post(`/api/programme-templates/${DEFAULT}/archive`, { archived: 'yes' })).status).toBe(422)
  })
})

describe('starting a programme', () => {
  it('previews exactly what will be invoiced and e-mailed, then starts with it or without billing', async () => {
    const trainerB = await signIn(baseUrl, TRAINER_B)
    const preview = await trainerB.get(`/api/clients/${BRENNAN}/programme-preview?templateId=${DEFAULT}`)
    expect(preview.status).toBe(200)
    // The seeded fee schedule (invented): a £600 + VAT deposit now, then six monthly instalments.
    expect(preview.body).toMatchObject({ hasSchedule: true, alreadyInvoiced: false, currency: 'GBP' })
    expect(preview.body.parts[0]).toMatchObject({ part: 'deposit', now: true, grossMinor: 72000 })
    expect(preview.body.parts.filter((p: any) => !p.now)).toHaveLength(6)
    expect(preview.body.recipients).toEqual(['orla.brennan@example.test'])
    // Nothing is written by a preview.
    expect(Number((await query('select count(*) n from invoices where client_id = ?', [BRENNAN]))[0]!.n)).toBe(0)

    const started = await trainerB.post(`/api/clients/${BRENNAN}/programme`, { templateId: DEFAULT, billing: 'plan' })
    expect(started.status).toBe(201)
    const rows = await query('select status, plan_part from invoices where client_id = ? order by scheduled_issue_on', [BRENNAN])
    expect(rows.filter(r => r.status === 'open').map(r => r.plan_part)).toEqual(['deposit'])
    expect(rows.filter(r => r.status === 'draft')).toHaveLength(6)

    // Without billing: the programme starts and nothing is invoiced.
    const trainerA = await signIn(baseUrl, TRAINER_A)
    const quiet = await trainerA.post(`/api/clients/${LINDGREN}/programme`, { templateId: DEFAULT, billing: 'none' })
    expect(quiet.status).toBe(201)
    expect(Number((await query('select count(*) n from invoices where client_id = ? and fee_schedule_id is not null', [LINDGREN]))[0]!.n)).toBe(0)
    expect((await trainerA.post(`/api/clients/${LINDGREN}/programme`, { templateId: DEFAULT, billing: 'sometimes' })).status).toBe(422)
  })
})
