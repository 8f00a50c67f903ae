// Idle and absolute session lifetimes, each on a private stack with short limits set through the environment.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signIn } from '../support/http'
import { TRAINER_A } from '../support/people'
import { startStack, type Stack } from '../support/stack'

const sleep = (ms: number) => new Promise(r => setTimeout(r, ms))
/** Sleeps until `ms` after `t0` (Date.now() time). */
const until = (t0: number, ms: number) => sleep(Math.max(0, t0 + ms - Date.now()))

let idle: Stack
let absolute: Stack

beforeAll(async () => {
  // Both stacks start side by side to save time; each has its own server, database and fake SMTP.
  ;[idle, absolute] = await Promise.all([
    startStack({ label: 'idle', env: { NUXT_SESSION_IDLE_SECONDS: '2' } }),
    startStack({ label: 'absolute', env: { NUXT_SESSION_ABSOLUTE_SECONDS: '3', NUXT_SESSION_IDLE_SECONDS: '3600' } }),
  ])
})
afterAll(async () => {
  await Promise.all([idle?.stop(), absolute?.stop()])
})

describe('session expiry', () => {
  it('ends a session left idle longer than NUXT_SESSION_IDLE_SECONDS', async () => {
    const agent = await signIn(idle.baseUrl, TRAINER_A)
    const t0 = Date.now()
    expect((await agent.get('/api/auth/me')).status).toBe(200)
    await until(t0, 3_000)
    const me = await agent.get('/api/auth/me')
    expect(me.status).toBe(401)
    // The server also clears the cookie it no longer honours.
    expect(agent.cookie).toBe('')
    // A fresh sign-in works again at once.
    const again = await signIn(idle.baseUrl, TRAINER_A)
    expect((await again.get('/api/auth/me')).status).toBe(200)
  })

  it('ends a session NUXT_SESSION_ABSOLUTE_SECONDS after sign-in, however busy it is', async () => {
    const agent = await signIn(absolute.baseUrl, TRAINER_A)
    const t0 = Date.now()
    // A request every second: alive at 0, 1 and 2 s (the limit is 3 s) ...
    for (const at of [0, 1_000, 2_000]) {
      await until(t0, at)
      expect((await agent.get('/api/auth/me')).status, `at ${at} ms`).toBe(200)
    }
    // ... and ended after 3 s.
    await until(t0, 3_600)
    expect((await agent.get('/api/auth/me')).status).toBe(401)
    expect((await agent.get('/api/auth/me')).status).toBe(401)
    const again = await signIn(absolute.baseUrl, TRAINER_A)
    expect((await again.get('/api/auth/me')).status).toBe(200)
  })
})
