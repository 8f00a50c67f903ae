// Bad input gets a clear 4xx with a message a person can act on, never a 500, and nothing is half-written.
import { createClient } from '@libsql/client'
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'
import { Agent, linkIn, signIn, waitForMail, type ApiResponse } from '../support/http'
import { ADMIN, CLIENT_A, HANDLER_A, TRAINER_A, TRAINER_B, TRAINER3_ID } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')

// 10,000 characters: far beyond every limit in shared/schemas (e-mail 254 per RFC 5321, names 120, passwords 200).
const HUGE = 'x'.repeat(10_000)
const HUGE_EMAIL = `${'a'.repeat(10_000)}@example.test`
const BROKEN_JSON = ['{"email": "a@example.test", ', '{email: a}', '{"a":1}}', 'not json at all']

let admin: Agent
let trainer: Agent
let anonymous: Agent
const seen: { what: string, status: number }[] = []

/** Records every answer, so the last test can prove that none of them was a 5xx. */
function note(what: string, res: ApiResponse) {
  seen.push({ what, status: res.status })
  return res
}

async function count(table: string): Promise<number> {
  const db = createClient({ url: databaseUrl })
  try { return Number((await db.execute(`SELECT count(*) AS n FROM ${table}`)).rows[0]!.n) }
  finally { db.close() }
}

beforeAll(async () => {
  await resetDatabase(databaseUrl)
  admin = await signIn(baseUrl, ADMIN)
  trainer = await signIn(baseUrl, TRAINER_A)
  anonymous = new Agent(baseUrl)
})
afterAll(() => resetDatabase(databaseUrl))
afterEach(({ task }) => {
  // A failing status assertion already says which; this keeps the 5xx sweep honest as tests are added.
  expect(seen.filter(s => s.status >= 500), task.name).toEqual([])
})

function expectFieldErrors(res: ApiResponse, fields: string[]) {
  expect(res.status, JSON.stringify(res.body)).toBe(422)
  expect(typeof res.body.message).toBe('string')
  expect(res.body.message).toMatch(/^Please correct/)
  for (const f of fields) expect(res.body.data?.fieldErrors?.[f], `fieldErrors.${f} in ${JSON.stringify(res.body)}`).toEqual(expect.any(String))
}

describe('malformed JSON is 400 with a message', () => {
  const routes: [string, () => Agent, string, string][] = [
    ['login', () => anonymous, 'POST', '/api/auth/login'],
    ['forgot-password', () => anonymous, 'POST', '/api/auth/forgot-password'],
    ['reset-password', () => anonymous, 'POST', '/api/auth/reset-password'],
    ['invitations', () => admin, 'POST', '/api/invitations'],
    ['users PATCH', () => admin, 'PATCH', `/api/users/${TRAINER3_ID}`],
    ['account password', () => trainer, 'POST', '/api/account/password'],
  ]
  for (const [name, who, method, path] of routes) {
    it(name, async () => {
      for (const body of BROKEN_JSON) {
        const res = note(`${name} ${body}`, await who().request(method, path, body))
        expect(res.status, `${body} → ${JSON.stringify(res.body)}`).toBe(400)
        expect(res.body.message).toMatch(/not valid JSON/)
      }
    })
  }
})

describe('missing fields and wrong types are 422 with field errors', () => {
  it('login', async () => {
    expectFieldErrors(note('login {}', await anonymous.post('/api/auth/login', {})), ['email', 'password'])
    expectFieldErrors(note('login types', await anonymous.post('/api/auth/login', { email: 42, password: true })), ['email', 'password'])
    expectFieldErrors(note('login bad email', await anonymous.post('/api/auth/login', { email: 'not-an-email', password: DEMO_PASSWORD })), ['email'])
    expectFieldErrors(note('login empty password', await anonymous.post('/api/auth/login', { email: TRAINER_A, password: '' })), ['password'])
    // A JSON value that is not an object.
    for (const body of ['null', '[]', '"text"', '12']) {
      const res = note(`login ${body}`, await anonymous.request('POST', '/api/auth/login', body))
      expect(res.status, `${body} → ${JSON.stringify(res.body)}`).toBe(422)
    }
  })

  it('forgot-password and reset-password', async () => {
    expectFieldErrors(note('forgot {}', await anonymous.post('/api/auth/forgot-password', {})), ['email'])
    expectFieldErrors(note('forgot type', await anonymous.post('/api/auth/forgot-password', { email: ['a@example.test'] })), ['email'])
    expectFieldErrors(note('reset {}', await anonymous.post('/api/auth/reset-password', {})), ['token', 'password'])
    expectFieldErrors(note('reset short', await anonymous.post('/api/auth/reset-password', { token: 'short', password: 'short' })), ['token', 'password'])
  })

  it('invitations', async () => {
    expectFieldErrors(note('invite {}', await admin.post('/api/invitations', {})), ['role'])
    expectFieldErrors(note('invite role', await admin.post('/api/invitations', { role: 'owner', email: 'new@example.test', name: 'N' })), ['role'])
    expectFieldErrors(note('invite handler', await trainer.post('/api/invitations', { role: 'handler', email: 'nope', name: 7 })), ['email', 'name', 'clientId'])
    expectFieldErrors(note('invite blank name', await admin.post('/api/invitations', { role: 'trainer', email: 'new@example.test', name: '   ' })), ['name'])
    expectFieldErrors(note('invite relationship', await trainer.post('/api/invitations', { role: 'handler', email: 'new@example.test', name: 'N', clientId: CLIENT_A, relationship: 'landlord' })), ['relationship'])
  })

  it('users PATCH', async () => {
    expectFieldErrors(note('patch {}', await admin.patch(`/api/users/${TRAINER3_ID}`, {})), ['_'])
    expectFieldErrors(note('patch types', await admin.patch(`/api/users/${TRAINER3_ID}`, { disabled: 'yes', name: 12 })), ['disabled', 'name'])
  })

  it('account password and invitation accept', async () => {
    expectFieldErrors(note('password {}', await trainer.post('/api/account/password', {})), ['currentPassword', 'newPassword'])
    expectFieldErrors(note('accept short', await anonymous.post(`/api/invitations/${'q'.repeat(43)}/accept`, { password: 'short' })), ['password'])
  })
})

describe('over-long strings are 422', () => {
  it('a 10,000-character e-mail or password at sign-in and forgot-password', async () => {
    expectFieldErrors(note('login huge email', await anonymous.post('/api/auth/login', { email: HUGE_EMAIL, password: DEMO_PASSWORD })), ['email'])
    expectFieldErrors(note('login huge password', await anonymous.post('/api/auth/login', { email: TRAINER_A, password: HUGE })), ['password'])
    expectFieldErrors(note('forgot huge', await anonymous.post('/api/auth/forgot-password', { email: HUGE_EMAIL })), ['email'])
  })

  it('a 10,000-character name or e-mail in an invitation, a user or a new password', async () => {
    expectFieldErrors(note('invite huge name', await admin.post('/api/invitations', { role: 'trainer', email: 'long.name@example.test', name: HUGE })), ['name'])
    expectFieldErrors(note('invite huge email', await admin.post('/api/invitations', { role: 'trainer', email: HUGE_EMAIL, name: 'Odile Brackwater' })), ['email'])
    expectFieldErrors(note('invite huge client', await trainer.post('/api/invitations', { role: 'handler', email: 'h@example.test', name: 'Odile Brackwater', clientId: HUGE })), ['clientId'])
    expectFieldErrors(note('patch huge name', await admin.patch(`/api/users/${TRAINER3_ID}`, { name: HUGE })), ['name'])
    expectFieldErrors(note('password huge', await trainer.post('/api/account/password', { currentPassword: DEMO_PASSWORD, newPassword: HUGE })), ['newPassword'])
    // Nothing was renamed.
    const users = (await admin.get('/api/users')).body as { id: string, name: string }[]
    expect(users.find(u => u.id === TRAINER3_ID)?.name).toBe('Ines Okoro')
  })

  it('121 characters is one too many for a name, 120 is allowed', async () => {
    expectFieldErrors(note('patch 121', await admin.patch(`/api/users/${TRAINER3_ID}`, { name: 'n'.repeat(121) })), ['name'])
    const ok = note('patch 120', await admin.patch(`/api/users/${TRAINER3_ID}`, { name: 'n'.repeat(120) }))
    expect(ok.status).toBe(200)
    expect(ok.body.name).toBe('n'.repeat(120))
    expect(note('patch back', await admin.patch(`/api/users/${TRAINER3_ID}`, { name: 'Ines Okoro' })).status).toBe(200)
  })
})

describe('unknown ids are 404', () => {
  it('client file and user', async () => {
    for (const path of ['/api/clients/does-not-exist', `/api/clients/${'z'.repeat(65)}`]) {
      const res = note(path, await admin.get(path))
      expect(res.status, path).toBe(404)
      expect(res.body.message).toEqual(expect.any(String))
    }
    const user = note('patch unknown', await admin.patch('/api/users/unknown', { name: 'Nobody' }))
    expect(user.status).toBe(404)
    expect(user.body.message).toMatch(/No account/)
    expect(note('disable unknown', await admin.patch('/api/users/unknown', { disabled: true })).status).toBe(404)
    expect(note('invitation unknown', await anonymous.get(`/api/invitations/${'q'.repeat(43)}`)).status).toBe(404)
    expect(note('invitation short', await anonymous.get('/api/invitations/short')).status).toBe(404)
    // An unknown client in an invitation is the same 404 as someone else's client.
    const invite = note('invite unknown client', await trainer.post('/api/invitations', { role: 'handler', email: 'h@example.test', name: 'Odile Brackwater', clientId: 'does-not-exist' }))
    expect(invite.status).toBe(404)
  })
})

describe('a bad query string is 400', () => {
  const cases: [string, string][] = [
    ['pageSize=100000', 'pageSize'],
    ['pageSize=2', 'pageSize'],
    ['page=0', 'page'],
    ['page=1.5', 'page'],
    ['page=abc', 'page'],
    ['sort=nonsense', 'sort'],
    ['dir=sideways', 'dir'],
    ['status=lost', 'status'],
    [`q=${'s'.repeat(101)}`, 'q'],
    ['q=a&q=b', 'q'],
  ]
  for (const [query, field] of cases) {
    it(`GET /api/clients?${query.slice(0, 40)}`, async () => {
      const res = note(query, await trainer.get(`/api/clients?${query}`))
      expect(res.status, JSON.stringify(res.body)).toBe(400)
      expect(res.body.message).toMatch(/^Invalid query/)
      expect(res.body.data.fieldErrors[field]).toEqual(expect.any(String))
    })
  }

  it('a good query still works (the control)', async () => {
    const res = note('good query', await trainer.get('/api/clients?page=1&pageSize=5&sort=household&dir=desc'))
    expect(res.status).toBe(200)
    expect(res.body.pageSize).toBe(5)
    const names = (res.body.rows as { householdName: string }[]).map(r => r.householdName)
    expect(names).toEqual([...names].sort().reverse())
  })

  it('users list with an unknown role', async () => {
    expect(note('users role', await admin.get('/api/users?role=owner')).status).toBe(400)
  })
})

describe('nothing half-written', () => {
  const tables = ['invitations', 'outbox', 'audit_log', 'users', 'client_handlers']
  const snapshot = async () => Object.fromEntries(await Promise.all(tables.map(async t => [t, await count(t)] as const)))

  it('refused invitations leave no invitation, outbox or audit row behind', async () => {
    // Sign in first: a sign-in writes an audit entry of its own.
    const trainerB = await signIn(baseUrl, TRAINER_B)
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = await snapshot()
    const refusals: [string, () => Promise<ApiResponse>, number][] = [
      ['trainer e-mail exists', () => admin.post('/api/invitations', { role: 'trainer', email: TRAINER_B, name: 'Tobias Quennell' }), 409],
      ['existing e-mail in other case', () => admin.post('/api/invitations', { role: 'trainer', email: TRAINER_B.toUpperCase(), name: 'Tobias Quennell' }), 409],
      ['staff e-mail as handler', () => trainer.post('/api/invitations', { role: 'handler', email: TRAINER_B, name: 'Tobias Quennell', clientId: CLIENT_A }), 409],
      ['not valid', () => admin.post('/api/invitations', { role: 'trainer', email: 'x', name: '' }), 422],
      ['broken JSON', () => admin.request('POST', '/api/invitations', '{"role":'), 400],
      ['not their client', () => trainerB.post('/api/invitations', { role: 'handler', email: 'side.door@example.test', name: 'Side Door', clientId: CLIENT_A }), 404],
      ['handler', () => handler.post('/api/invitations', { role: 'handler', email: 'side.door@example.test', name: 'Side Door', clientId: CLIENT_A }), 403],
    ]
    for (const [what, send, status] of refusals) {
      const res = note(what, await send())
      expect(res.status, `${what}: ${JSON.stringify(res.body)}`).toBe(status)
    }
    expect(await snapshot()).toEqual(before)

    // The control: one accepted invitation adds exactly one invitation, one e-mail and one audit entry.
    const ok = note('good invite', await admin.post('/api/invitations', { role: 'trainer', email: 'odile.brackwater@example.test', name: 'Odile Brackwater' }))
    expect(ok.status).toBe(201)
    expect(await snapshot()).toEqual({ ...before, invitations: before.invitations! + 1, outbox: before.outbox! + 1, audit_log: before.audit_log! + 1 })
  })

  it('accepting a handler invitation whose e-mail became a trainer is refused and rolled back', async () => {
    const email = 'dual.role@example.test'
    const db = createClient({ url: databaseUrl })
    try {
      const handlerInvite = note('handler invite', await trainer.post('/api/invitations', { role: 'handler', email, name: 'Dual Role', clientId: CLIENT_A }))
      expect(handlerInvite.status).toBe(201)
      const trainerInvite = note('trainer invite', await admin.post('/api/invitations', { role: 'trainer', email, name: 'Dual Role' }))
      expect(trainerInvite.status).toBe(201)
      // Read the tokens from the e-mails as delivered (the outbox never holds them: they are minted at sending).
      const tokenIn = async (subject: string) => linkIn((await waitForMail(mailUrl, email, subject)).text, '/invitation/').split('/').pop()!
      const handlerToken = await tokenIn('programme')
      const trainerToken = await tokenIn('as a trainer')

      expect(note('accept trainer', await new Agent(baseUrl).post(`/api/invitations/${trainerToken}/accept`, { password: 'a-long-enough-password' })).status).toBe(200)
      const usersBefore = await count('users')
      const conflict = note('accept handler', await new Agent(baseUrl).post(`/api/invitations/${handlerToken}/accept`, { password: 'a-different-long-password' }))
      expect(conflict.status).toBe(409)
      expect(conflict.body.message).toMatch(/different account/)

      expect(await count('users')).toBe(usersBefore)
      const links = await db.execute({ sql: 'SELECT count(*) AS n FROM client_handlers ch JOIN users u ON u.id = ch.user_id WHERE u.email = ?', args: [email] })
      expect(Number(links.rows[0]!.n)).toBe(0)
      const invitation = await db.execute({ sql: 'SELECT accepted_at FROM invitations WHERE email = ? AND role = ?', args: [email, 'handler'] })
      expect(invitation.rows[0]!.accepted_at).toBeNull()
      // The trainer's password was not replaced by the refused acceptance.
      expect(note('login trainer', await new Agent(baseUrl).post('/api/auth/login', { email, password: 'a-long-enough-password' })).status).toBe(200)
      expect(note('login refused pw', await new Agent(baseUrl).post('/api/auth/login', { email, password: 'a-different-long-password' })).status).toBe(401)
    }
    finally { db.close() }
  })

  it('a refused user change leaves the account as it was', async () => {
    const me = (await admin.get('/api/auth/me')).body.user
    const self = note('disable self', await admin.patch(`/api/users/${me.id}`, { disabled: true, name: 'Renamed Admin' }))
    expect(self.status).toBe(422)
    const users = (await admin.get('/api/users')).body as { id: string, name: string, disabledAt: unknown }[]
    expect(users.find(u => u.id === me.id)).toMatchObject({ name: 'Elspeth Varga', disabledAt: null })
  })
})

describe('never a 500', () => {
  it('every answer in this file was a 4xx or 2xx', () => {
    expect(seen.length).toBeGreaterThan(60)
    expect(seen.filter(s => s.status >= 500)).toEqual([])
    expect(seen.every(s => s.status >= 200 && s.status < 500)).toBe(true)
  })
})
