// Second factor for staff (issue 13): set-up with a QR code, sign-in with a code from the app (each code once) or a
// recovery code (each once), secrets and recovery codes never stored in clear, and the office's rule that every
// staff account must use one (OWASP ASVS 4.0 V2.7, V2.8, V2.9).
import { afterAll, beforeEach, describe, expect, inject, it } from 'vitest'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'
import { totpCode } from '../../shared/utils/second-factor'
import { Agent, noteSecret, signIn } from '../support/http'
import { ADMIN, CLIENT_A, HANDLER_A, TRAINER_A, TRAINER_A_ID, TRAINER_B } from '../support/people'
import { sqlRows } from '../support/db'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')

beforeEach(() => resetDatabase(databaseUrl))
afterAll(() => resetDatabase(databaseUrl))

const sql = <T = Record<string, unknown>>(statement: string, args: (string | number)[] = []) => sqlRows<T>(databaseUrl, statement, args)

/** Sets up a second factor for a signed-in agent; returns the secret (as the app would hold it) and the recovery codes. */
async function enrol(agent: Agent): Promise<{ secret: string, recoveryCodes: string[] }> {
  const start = await agent.post('/api/account/second-factor/start')
  expect(start.status, JSON.stringify(start.body)).toBe(200)
  expect(start.body.qrCode).toMatch(/^data:image\/png;base64,/)
  expect(start.body.uri).toContain(`secret=${start.body.secret}`)
  const secret: string = start.body.secret
  noteSecret(secret)
  const wrong = await agent.post('/api/account/second-factor/confirm', { code: totpCode(secret, Date.now() - 10 * 60_000) })
  expect(wrong.status).toBe(422)
  const confirm = await agent.post('/api/account/second-factor/confirm', { code: totpCode(secret, Date.now()) })
  expect(confirm.status, JSON.stringify(confirm.body)).toBe(200)
  for (const c of confirm.body.recoveryCodes) noteSecret(c)
  return { secret, recoveryCodes: confirm.body.recoveryCodes }
}

describe('setting up a second factor', () => {
  it('shows a QR code, turns on with the first code, and gives 10 recovery codes; nothing is stored in clear', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    expect((await trainer.get('/api/account/second-factor')).body).toMatchObject({ enabled: false, required: false })
    const { secret, recoveryCodes } = await enrol(trainer)
    expect(recoveryCodes).toHaveLength(10)
    expect((await trainer.get('/api/account/second-factor')).body).toMatchObject({ enabled: true, recoveryCodesLeft: 10 })
    const dump = JSON.stringify(await sql('SELECT u.*, r.code_hash FROM users u LEFT JOIN recovery_codes r ON r.user_id = u.id'))
    expect(dump).not.toContain(secret)
    for (const c of recoveryCodes) expect(dump).not.toContain(c.replace('-', ''))
  })
})

describe('signing in with a second factor', () => {
  it('asks for the code after the password; a wrong code is refused; the right one signs in; the same code never works twice', async () => {
    const { secret } = await enrol(await signIn(baseUrl, TRAINER_A))
    const agent = new Agent(baseUrl)
    const first = await agent.post('/api/auth/login', { email: TRAINER_A, password: DEMO_PASSWORD })
    expect(first.status).toBe(200)
    expect(first.body).toEqual({ secondFactor: 'required' })
    // The password alone opens nothing.
    expect((await agent.get('/api/auth/me')).status).toBe(401)
    expect((await agent.get(`/api/clients/${CLIENT_A}`)).status).toBe(401)
    expect((await agent.post('/api/auth/second-factor', { code: '000000' })).status).toBe(422)
    const code = totpCode(secret, Date.now() + 30_000)
    const ok = await agent.post('/api/auth/second-factor', { code })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    expect((await agent.get(`/api/clients/${CLIENT_A}`)).status).toBe(200)
    // Someone who saw the code over a shoulder, with the password: refused.
    const thief = new Agent(baseUrl)
    await thief.post('/api/auth/login', { email: TRAINER_A, password: DEMO_PASSWORD })
    expect((await thief.post('/api/auth/second-factor', { code })).status).toBe(422)
    expect((await thief.get('/api/auth/me')).status).toBe(401)
  })

  it('a recovery code signs in once', async () => {
    const { recoveryCodes } = await enrol(await signIn(baseUrl, TRAINER_A))
    const use = async () => {
      const agent = new Agent(baseUrl)
      await agent.post('/api/auth/login', { email: TRAINER_A, password: DEMO_PASSWORD })
      return agent.post('/api/auth/second-factor', { recoveryCode: recoveryCodes[3]!.toUpperCase() })
    }
    expect((await use()).status).toBe(200)
    expect((await use()).status).toBe(422)
  })

  it('without a password first, the code step is refused', async () => {
    expect((await new Agent(baseUrl).post('/api/auth/second-factor', { code: '123456' })).status).toBe(401)
  })
})

describe('the office requires a second factor for all staff', () => {
  it('a staff member without one can only set it up; handlers are not affected; it cannot be turned off meanwhile', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const put = await admin.request('PUT', '/api/settings/security', { staffSecondFactor: true })
    expect(put.status, JSON.stringify(put.body)).toBe(200)
    const trainer = await signIn(baseUrl, TRAINER_B)
    const blocked = await trainer.get('/api/clients')
    expect(blocked.status).toBe(403)
    expect(blocked.body.message).toMatch(/second factor/)
    expect((await trainer.get('/api/auth/me')).body.mustEnrolSecondFactor).toBe(true)
    expect((await trainer.get('/api/account/second-factor')).body).toMatchObject({ enabled: false, required: true })
    await enrol(trainer)
    expect((await trainer.get('/api/clients')).status).toBe(200)
    const off = await trainer.request('DELETE', '/api/account/second-factor', { password: DEMO_PASSWORD })
    expect(off.status).toBe(409)
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.get(`/api/clients/${CLIENT_A}`)).status).toBe(200)
  })

  it('without the rule, a person turns it off with their password', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    await enrol(trainer)
    expect((await trainer.request('DELETE', '/api/account/second-factor', { password: 'not-my-password' })).status).toBe(422)
    const off = await trainer.request('DELETE', '/api/account/second-factor', { password: DEMO_PASSWORD })
    expect(off.status).toBe(200)
    expect(off.body.enabled).toBe(false)
    expect((await new Agent(baseUrl).post('/api/auth/login', { email: TRAINER_A, password: DEMO_PASSWORD })).body.user).toMatchObject({ email: TRAINER_A })
  })
})

describe('the office resets a lost second factor', () => {
  it('clears it and ends the person\'s sessions; the password alone then signs in; only the admin may, never on themselves', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    await enrol(trainer)
    expect((await trainer.post(`/api/users/${TRAINER_A_ID}/second-factor-reset`)).status).toBe(403)
    const admin = await signIn(baseUrl, ADMIN)
    const reset = await admin.post(`/api/users/${TRAINER_A_ID}/second-factor-reset`)
    expect(reset.status, JSON.stringify(reset.body)).toBe(200)
    expect((await trainer.get('/api/auth/me')).status).toBe(401)
    expect((await new Agent(baseUrl).post('/api/auth/login', { email: TRAINER_A, password: DEMO_PASSWORD })).body.user).toMatchObject({ email: TRAINER_A })
    expect(Number((await sql<{ n: number }>('SELECT count(*) n FROM recovery_codes WHERE user_id = ?', [TRAINER_A_ID]))[0]!.n)).toBe(0)
    const self = (await admin.get('/api/auth/me')).body.user.id
    expect((await admin.post(`/api/users/${self}/second-factor-reset`)).status).toBe(422)
  })
})
