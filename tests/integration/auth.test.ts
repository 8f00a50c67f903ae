// Sign-in, sign-out, password change and reset, invitations and the cross-site guard, against the shared stack.
import { createClient } from '@libsql/client'
import { afterAll, beforeEach, describe, expect, inject, it } from 'vitest'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'
import { Agent, inbox, linkIn, signIn, waitForMail, type InboxMessage } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B, TRAINER3_ID } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')

// Demo trainer 3 (see scripts/lib/seed-data.ts); no other test in this file signs in as them.
const TRAINER_3 = 'ines.okoro@larkspur.test'
// A new password long enough for the shared rule (at least 10 characters).
const NEW_PASSWORD = 'lantern-moss-harbour-47'
const SIGN_IN_REFUSED = 'That e-mail and password do not match an active account. Check both, or reset your password.'

// Every test starts from the demo scenario; the last one leaves it as the next file expects.
beforeEach(() => resetDatabase(databaseUrl))
afterAll(() => resetDatabase(databaseUrl))

let seq = 0
/** A fresh invented address per call, so earlier messages in the shared inbox never match. */
const freshEmail = (who: string) => `${who}.${Date.now().toString(36)}${++seq}@example.test`

/** Waits for a message to `to` that was not in the inbox before (`before` = messages already there). */
async function waitForNewMail(to: string, before: InboxMessage[], timeoutMs = 10_000): Promise<InboxMessage> {
  const known = new Set(before.map(m => m.id))
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const fresh = (await inbox(mailUrl, to)).filter(m => !known.has(m.id))
    if (fresh.length) return fresh[0]!
    if (Date.now() > deadline) throw new Error(`No new e-mail to ${to} within ${timeoutMs} ms`)
    await new Promise(r => setTimeout(r, 150))
  }
}

async function sql<T = Record<string, unknown>>(statement: string, args: (string | number)[] = []): Promise<T[]> {
  const db = createClient({ url: databaseUrl })
  try { return (await db.execute({ sql: statement, args })).rows as unknown as T[] }
  finally { db.close() }
}

async function count(statement: string, args: (string | number)[] = []): Promise<number> {
  return Number((await sql<{ n: number }>(statement, args))[0]!.n)
}

const tokenOfInvitationLink = (link: string) => new URL(link).pathname.split('/').pop()!

async function login(agent: Agent, email: string, password: string) {
  return agent.post('/api/auth/login', { email, password })
}

describe('sign-in', () => {
  it('answers 200 with a session cookie, and /api/auth/me returns the user with their role', async () => {
    const agent = new Agent(baseUrl)
    const res = await login(agent, TRAINER_A, DEMO_PASSWORD)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const cookie = res.headers.getSetCookie().find(c => c.startsWith('forescent-session='))
    expect(cookie).toBeDefined()
    expect(cookie!.toLowerCase()).toContain('httponly')
    expect(cookie!.toLowerCase()).toContain('samesite=lax')
    expect(res.body.user).toMatchObject({ email: TRAINER_A, role: 'trainer' })
    expect(res.body.user).not.toHaveProperty('passwordHash')

    const me = await agent.get('/api/auth/me')
    expect(me.status).toBe(200)
    expect(me.body.user).toMatchObject({ email: TRAINER_A, role: 'trainer', name: 'Maren Holt' })
    // Without the cookie the same request is anonymous.
    expect((await new Agent(baseUrl).get('/api/auth/me')).status).toBe(401)
  })

  it('normalises the e-mail (case and spaces) before looking it up', async () => {
    const res = await login(new Agent(baseUrl), `  ${HANDLER_A.toUpperCase()} `, DEMO_PASSWORD)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.user).toMatchObject({ email: HANDLER_A, role: 'handler' })
  })

  it('refuses a wrong password and an unknown e-mail with the identical 401, signing no one in', async () => {
    const agents = [new Agent(baseUrl), new Agent(baseUrl)] as const
    const wrong = await login(agents[0], TRAINER_A, 'not-the-demo-password')
    const unknown = await login(agents[1], 'nobody.here@example.test', DEMO_PASSWORD)
    expect(wrong.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(wrong.body.message).toBe(SIGN_IN_REFUSED)
    expect(unknown.body.message).toBe(wrong.body.message)
    expect(unknown.body.statusMessage).toBe(wrong.body.statusMessage)
    // Whatever cookie came back (an empty session may), it does not sign anyone in.
    for (const agent of agents) expect((await agent.get('/api/auth/me')).status).toBe(401)
  })

  it('a disabled account cannot sign in, its open session ends at once, and re-enabling lets it back in', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const before = await signIn(baseUrl, TRAINER_3)
    expect((await before.get('/api/auth/me')).status).toBe(200)

    const disabled = await admin.patch(`/api/users/${TRAINER3_ID}`, { disabled: true })
    expect(disabled.status, JSON.stringify(disabled.body)).toBe(200)
    expect(disabled.body.disabledAt).not.toBeNull()

    const me = await before.get('/api/auth/me')
    expect(me.status).toBe(401)
    // With the right password the answer is the same one as for a wrong password.
    const refused = await login(new Agent(baseUrl), TRAINER_3, DEMO_PASSWORD)
    expect(refused.status).toBe(401)
    expect(refused.body.message).toBe(SIGN_IN_REFUSED)
    // And a reset link is not sent to a disabled account.
    expect((await new Agent(baseUrl).post('/api/auth/forgot-password', { email: TRAINER_3 })).status).toBe(200)
    expect(await count('SELECT count(*) AS n FROM outbox WHERE to_address = ?', [TRAINER_3])).toBe(0)

    const enabled = await admin.patch(`/api/users/${TRAINER3_ID}`, { disabled: false })
    expect(enabled.status).toBe(200)
    expect(enabled.body.disabledAt).toBeNull()
    const again = await login(new Agent(baseUrl), TRAINER_3, DEMO_PASSWORD)
    expect(again.status, JSON.stringify(again.body)).toBe(200)
    // The session from before the disabling stays ended.
    expect((await before.get('/api/auth/me')).status).toBe(401)
  })

  it('the admin cannot disable their own account', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const me = (await admin.get('/api/auth/me')).body.user
    const res = await admin.patch(`/api/users/${me.id}`, { disabled: true })
    expect(res.status).toBe(422)
    expect(res.body.message).toMatch(/cannot disable your own account/)
    expect((await admin.get('/api/auth/me')).status).toBe(200)
  })
})

describe('sign-out', () => {
  it('ends every session of the user, and only theirs', async () => {
    const laptop = await signIn(baseUrl, HANDLER_A)
    const phone = await signIn(baseUrl, HANDLER_A)
    const someoneElse = await signIn(baseUrl, HANDLER_B)
    expect((await phone.get('/api/auth/me')).status).toBe(200)

    const out = await laptop.post('/api/auth/logout')
    expect(out.status).toBe(200)
    expect(out.body).toEqual({ signedOut: true })
    expect(laptop.cookie).toBe('')
    expect((await laptop.get('/api/auth/me')).status).toBe(401)
    expect((await phone.get('/api/auth/me')).status).toBe(401)
    expect((await someoneElse.get('/api/auth/me')).status).toBe(200)
    // Signing in again works.
    const back = await signIn(baseUrl, HANDLER_A)
    expect((await back.get('/api/auth/me')).status).toBe(200)
  })
})

describe('password change', () => {
  it('checks the current password, keeps this device signed in, signs out the others, and swaps the password', async () => {
    const here = await signIn(baseUrl, HANDLER_B)
    const elsewhere = await signIn(baseUrl, HANDLER_B)

    const wrong = await here.post('/api/account/password', { currentPassword: 'not-my-password', newPassword: NEW_PASSWORD })
    expect(wrong.status).toBe(422)
    expect(wrong.body.data.fieldErrors.currentPassword).toBeTruthy()
    // A wrong attempt changes nothing.
    expect((await elsewhere.get('/api/auth/me')).status).toBe(200)
    expect((await login(new Agent(baseUrl), HANDLER_B, DEMO_PASSWORD)).status).toBe(200)

    const tooShort = await here.post('/api/account/password', { currentPassword: DEMO_PASSWORD, newPassword: 'short' })
    expect(tooShort.status).toBe(422)
    expect(tooShort.body.data.fieldErrors.newPassword).toBeTruthy()

    const ok = await here.post('/api/account/password', { currentPassword: DEMO_PASSWORD, newPassword: NEW_PASSWORD })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    expect(ok.body.user).toMatchObject({ email: HANDLER_B, role: 'handler' })

    expect((await here.get('/api/auth/me')).status).toBe(200)
    expect((await elsewhere.get('/api/auth/me')).status).toBe(401)
    const old = await login(new Agent(baseUrl), HANDLER_B, DEMO_PASSWORD)
    expect(old.status).toBe(401)
    expect(old.body.message).toBe(SIGN_IN_REFUSED)
    expect((await login(new Agent(baseUrl), HANDLER_B, NEW_PASSWORD)).status).toBe(200)
    // The device that changed the password is still signed in after the other sign-in.
    expect((await here.get('/api/auth/me')).status).toBe(200)
  })

  it('needs a signed-in user', async () => {
    const res = await new Agent(baseUrl).post('/api/account/password', { currentPassword: DEMO_PASSWORD, newPassword: NEW_PASSWORD })
    expect(res.status).toBe(401)
  })
})

describe('forgot and reset password', () => {
  it('answers the same for known and unknown e-mails, and mails a link only to the known one', async () => {
    const unknownEmail = freshEmail('no.account')
    const before = await inbox(mailUrl, TRAINER_B)

    const known = await new Agent(baseUrl).post('/api/auth/forgot-password', { email: TRAINER_B })
    const unknown = await new Agent(baseUrl).post('/api/auth/forgot-password', { email: unknownEmail })
    expect(known.status).toBe(200)
    expect(unknown.status).toBe(200)
    expect(unknown.body).toEqual(known.body)

    const mail = await waitForNewMail(TRAINER_B, before)
    expect(mail.subject).toMatch(/reset/i)
    expect(linkIn(mail.text, '/reset-password?token=').startsWith(`${baseUrl}/reset-password?token=`)).toBe(true)
    // The known address's message has been delivered, so the unknown one would have been too.
    expect(await inbox(mailUrl, unknownEmail)).toEqual([])
    expect(await sql('SELECT id FROM outbox WHERE to_address = ?', [unknownEmail])).toEqual([])
  })

  it('the mailed link sets a new password once, signs in, and ends the old sessions', async () => {
    const oldSession = await signIn(baseUrl, TRAINER_B)
    const before = await inbox(mailUrl, TRAINER_B)
    expect((await new Agent(baseUrl).post('/api/auth/forgot-password', { email: TRAINER_B })).status).toBe(200)
    const mail = await waitForNewMail(TRAINER_B, before)
    const token = new URL(linkIn(mail.text, '/reset-password?token=')).searchParams.get('token')!
    expect(token.length).toBeGreaterThanOrEqual(20)

    const browser = new Agent(baseUrl)
    const reset = await browser.post('/api/auth/reset-password', { token, password: NEW_PASSWORD })
    expect(reset.status, JSON.stringify(reset.body)).toBe(200)
    expect(reset.body.user).toMatchObject({ email: TRAINER_B, role: 'trainer' })
    expect((await browser.get('/api/auth/me')).body.user).toMatchObject({ email: TRAINER_B })
    expect((await oldSession.get('/api/auth/me')).status).toBe(401)

    const reuse = await new Agent(baseUrl).post('/api/auth/reset-password', { token, password: 'another-long-password' })
    expect(reuse.status).toBe(400)
    expect(reuse.body.message).toMatch(/expired or was already used/)

    expect((await login(new Agent(baseUrl), TRAINER_B, DEMO_PASSWORD)).status).toBe(401)
    expect((await login(new Agent(baseUrl), TRAINER_B, NEW_PASSWORD)).status).toBe(200)
    // The refused second use did not change the password either.
    expect((await login(new Agent(baseUrl), TRAINER_B, 'another-long-password')).status).toBe(401)
  })

  it('refuses a made-up token with 400', async () => {
    const res = await new Agent(baseUrl).post('/api/auth/reset-password', { token: 'z'.repeat(43), password: NEW_PASSWORD })
    expect(res.status).toBe(400)
    expect((await login(new Agent(baseUrl), TRAINER_B, DEMO_PASSWORD)).status).toBe(200)
  })
})

describe('invitations', () => {
  it('the admin invites a trainer, who accepts once from the mailed link and is signed in', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const email = freshEmail('new.trainer')
    const created = await admin.post('/api/invitations', { role: 'trainer', email: email.toUpperCase(), name: 'Wren Castellane' })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body).toMatchObject({ email, role: 'trainer', clientId: null })

    const mail = await waitForMail(mailUrl, email)
    expect(mail.subject).toMatch(/trainer/)
    const link = linkIn(mail.text, '/invitation/')
    expect(link.startsWith(`${baseUrl}/invitation/`)).toBe(true)
    const token = tokenOfInvitationLink(link)

    const shown = await new Agent(baseUrl).get(`/api/invitations/${token}`)
    expect(shown.status).toBe(200)
    expect(shown.body).toMatchObject({ email, role: 'trainer', name: 'Wren Castellane' })

    const newcomer = new Agent(baseUrl)
    const accepted = await newcomer.post(`/api/invitations/${token}/accept`, { password: NEW_PASSWORD })
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200)
    expect(accepted.body.user).toMatchObject({ email, role: 'trainer' })
    expect((await newcomer.get('/api/auth/me')).body.user).toMatchObject({ email, role: 'trainer', name: 'Wren Castellane' })
    // The new trainer has no clients yet.
    const list = await newcomer.get('/api/clients')
    expect(list.status).toBe(200)
    expect(list.body.rows).toEqual([])

    expect((await new Agent(baseUrl).post(`/api/invitations/${token}/accept`, { password: 'someone-elses-password' })).status).toBe(404)
    expect((await new Agent(baseUrl).get(`/api/invitations/${token}`)).status).toBe(404)
    expect((await login(new Agent(baseUrl), email, NEW_PASSWORD)).status).toBe(200)
    expect((await login(new Agent(baseUrl), email, 'someone-elses-password')).status).toBe(401)

    // Now that the account exists, inviting the same e-mail again is a conflict.
    const again = await admin.post('/api/invitations', { role: 'trainer', email, name: 'Wren Castellane' })
    expect(again.status).toBe(409)
  })

  it('inviting a trainer whose e-mail already has an account is 409', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const res = await admin.post('/api/invitations', { role: 'trainer', email: TRAINER_B, name: 'Tobias Quennell' })
    expect(res.status).toBe(409)
    expect(res.body.message).toContain(TRAINER_B)
  })

  it('a trainer invites a handler to their own client; the handler then sees exactly that client', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const email = freshEmail('new.handler')
    const created = await trainer.post('/api/invitations', { role: 'handler', email, name: 'Perry Fairweather', clientId: CLIENT_A, relationship: 'partner' })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body).toMatchObject({ email, role: 'handler', clientId: CLIENT_A })

    const mail = await waitForMail(mailUrl, email)
    expect(mail.subject).toContain('Fairweather household')
    const token = tokenOfInvitationLink(linkIn(mail.text, '/invitation/'))
    expect((await new Agent(baseUrl).get(`/api/invitations/${token}`)).body).toMatchObject({ email, role: 'handler' })

    const handler = new Agent(baseUrl)
    const accepted = await handler.post(`/api/invitations/${token}/accept`, { password: NEW_PASSWORD })
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200)
    expect(accepted.body.user).toMatchObject({ email, role: 'handler' })

    const list = await handler.get('/api/clients?pageSize=200')
    expect(list.status).toBe(200)
    expect(list.body.rows.map((r: { id: string }) => r.id)).toEqual([CLIENT_A])
    expect(list.body.total).toBe(1)
    expect((await handler.get(`/api/clients/${CLIENT_A}`)).status).toBe(200)
    expect((await handler.get(`/api/clients/${CLIENT_B}`)).status).toBe(404)
    const file = await trainer.get(`/api/clients/${CLIENT_A}`)
    expect(file.body.handlers).toContainEqual(expect.objectContaining({ email, relationship: 'partner' }))
  })

  it('refuses: trainer B for trainer A\'s client (404), a handler (403), a trainer inviting a trainer (403)', async () => {
    const before = await count('SELECT count(*) AS n FROM invitations')
    const trainerB = await signIn(baseUrl, TRAINER_B)
    const handler = await signIn(baseUrl, HANDLER_A)
    const trainerA = await signIn(baseUrl, TRAINER_A)
    const handlerInvite = (email: string) => ({ role: 'handler', email, name: 'Sol Fairweather', clientId: CLIENT_A })

    expect((await trainerB.post('/api/invitations', handlerInvite(freshEmail('b')))).status).toBe(404)
    expect((await handler.post('/api/invitations', handlerInvite(freshEmail('h')))).status).toBe(403)
    const trainerInvite = await trainerA.post('/api/invitations', { role: 'trainer', email: freshEmail('t'), name: 'Sol Marchetti' })
    expect(trainerInvite.status).toBe(403)
    expect(trainerInvite.body.message).toMatch(/Only the admin/)
    expect((await new Agent(baseUrl).post('/api/invitations', handlerInvite(freshEmail('anon')))).status).toBe(401)

    expect(await count('SELECT count(*) AS n FROM invitations')).toBe(before)
  })

  it('an expired invitation is 404 on GET and on accept', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const email = freshEmail('late.trainer')
    expect((await admin.post('/api/invitations', { role: 'trainer', email, name: 'Lowri Pendark' })).status).toBe(201)
    const token = tokenOfInvitationLink(linkIn((await waitForMail(mailUrl, email)).text, '/invitation/'))
    expect((await new Agent(baseUrl).get(`/api/invitations/${token}`)).status).toBe(200)

    const db = createClient({ url: databaseUrl })
    try {
      const changed = await db.execute({ sql: 'UPDATE invitations SET expires_at = ? WHERE email = ?', args: [Date.now() - 60_000, email] })
      expect(changed.rowsAffected).toBe(1)
    }
    finally { db.close() }

    expect((await new Agent(baseUrl).get(`/api/invitations/${token}`)).status).toBe(404)
    const accept = await new Agent(baseUrl).post(`/api/invitations/${token}/accept`, { password: NEW_PASSWORD })
    expect(accept.status).toBe(404)
    expect(accept.body.message).toMatch(/expired/)
    expect(await sql('SELECT id FROM users WHERE email = ?', [email])).toEqual([])
  })
})

describe('cross-site requests', () => {
  const credentials = { email: TRAINER_A, password: DEMO_PASSWORD }

  it('refuses a sign-in from another origin with 403, before looking at the credentials', async () => {
    const agent = new Agent(baseUrl)
    const res = await agent.post('/api/auth/login', credentials, { origin: 'http://evil.example' })
    expect(res.status).toBe(403)
    expect(res.body.message).toMatch(/another website/)
    expect((await agent.get('/api/auth/me')).status).toBe(401)
  })

  it('refuses Sec-Fetch-Site: cross-site (and same-site) with 403', async () => {
    for (const site of ['cross-site', 'same-site']) {
      const agent = new Agent(baseUrl)
      const res = await agent.post('/api/auth/login', credentials, { 'sec-fetch-site': site })
      expect(res.status, site).toBe(403)
      expect((await agent.get('/api/auth/me')).status, site).toBe(401)
    }
  })

  it('refuses Origin: null and an unparsable origin', async () => {
    for (const origin of ['null', 'not a url']) {
      expect((await new Agent(baseUrl).post('/api/auth/login', credentials, { origin })).status, origin).toBe(403)
    }
  })

  it('refuses a signed-in user\'s state change from another origin', async () => {
    const agent = await signIn(baseUrl, HANDLER_A)
    const res = await agent.post('/api/auth/logout', {}, { origin: 'http://evil.example' })
    expect(res.status).toBe(403)
    expect((await agent.get('/api/auth/me')).status).toBe(200)
  })

  it('handles requests from its own origin normally', async () => {
    const agent = new Agent(baseUrl)
    const ok = await agent.post('/api/auth/login', credentials, { 'origin': baseUrl, 'sec-fetch-site': 'same-origin' })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    expect((await agent.get('/api/auth/me')).body.user).toMatchObject({ email: TRAINER_A })
    const wrong = await new Agent(baseUrl).post('/api/auth/login', { ...credentials, password: 'not-the-demo-password' }, { origin: baseUrl })
    expect(wrong.status).toBe(401)
  })
})

describe('throttling guesses', () => {
  it('refuses the 11th failed sign-in for one e-mail within 15 minutes with 429 and Retry-After', async () => {
    const email = freshEmail('guess')
    for (let i = 0; i < 10; i++) {
      const res = await new Agent(baseUrl).post('/api/auth/login', { email, password: `wrong-guess-${i}` })
      expect(res.status).toBe(401)
    }
    const blocked = await new Agent(baseUrl).post('/api/auth/login', { email, password: 'wrong-guess-10' })
    expect(blocked.status).toBe(429)
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    expect(blocked.body.message).toMatch(/Too many failed sign-ins\. .*wait \d+ minutes/)
  })

  it('a successful sign-in forgets the earlier failures of that e-mail', async () => {
    for (let round = 0; round < 2; round++) {
      for (let i = 0; i < 9; i++) {
        expect((await new Agent(baseUrl).post('/api/auth/login', { email: TRAINER_3, password: 'not-it-at-all' })).status).toBe(401)
      }
      expect((await (await signIn(baseUrl, TRAINER_3)).get('/api/auth/me')).body.user).toMatchObject({ email: TRAINER_3 })
    }
  })

  it('refuses the 6th reset request for one e-mail within an hour with 429, and sends no more links', async () => {
    const email = freshEmail('reset')
    for (let i = 0; i < 5; i++) expect((await new Agent(baseUrl).post('/api/auth/forgot-password', { email })).status).toBe(200)
    const blocked = await new Agent(baseUrl).post('/api/auth/forgot-password', { email })
    expect(blocked.status).toBe(429)
    expect(blocked.body.message).toMatch(/Too many reset requests/)
  })
})
