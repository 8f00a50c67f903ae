// The authorization matrix: every file under server/api must have a row here saying what each kind of caller
// gets; then every row is exercised against the running server.
import { readdirSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { describe, expect, inject, it } from 'vitest'
import { Agent, signIn, type ApiResponse } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B, TRAINER3_ID } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')

type Actor = 'anonymous' | 'handlerA' | 'handlerB' | 'trainerA' | 'trainerB' | 'admin'
const ACTORS: Record<Actor, string | null> = {
  anonymous: null, handlerA: HANDLER_A, handlerB: HANDLER_B, trainerA: TRAINER_A, trainerB: TRAINER_B, admin: ADMIN,
}
type Expectation = number | { status: number, check: (res: ApiResponse) => void }

interface Row {
  route: string // "METHOD /api/path/[param]", as the file lays it out
  path: string | ((actor: Actor) => string)
  body?: unknown | ((actor: Actor) => unknown)
  expect: Record<Actor, Expectation>
  /** The row changes data: reseed before it runs. */
  mutates?: boolean
}

const everyone = (status: number): Record<Actor, number> => ({ anonymous: status, handlerA: status, handlerB: status, trainerA: status, trainerB: status, admin: status })
const signedIn = (status: number): Record<Actor, number> => ({ ...everyone(status), anonymous: 401 })
const adminOnly = (status: number): Record<Actor, number> => ({ anonymous: 401, handlerA: 403, handlerB: 403, trainerA: 403, trainerB: 403, admin: status })
const ids = (res: ApiResponse) => (res.body.rows as { id: string }[]).map(r => r.id)

const ROWS: Row[] = [
  { route: 'POST /api/auth/login', path: '/api/auth/login', body: { email: TRAINER_A, password: 'not-the-password' }, expect: everyone(401) },
  { route: 'POST /api/auth/logout', path: '/api/auth/logout', expect: everyone(200), mutates: true },
  { route: 'GET /api/auth/me', path: '/api/auth/me', expect: signedIn(200) },
  { route: 'POST /api/auth/forgot-password', path: '/api/auth/forgot-password', body: { email: 'nobody@example.test' }, expect: everyone(200) },
  { route: 'POST /api/auth/reset-password', path: '/api/auth/reset-password', body: { token: 'x'.repeat(43), password: 'a-long-enough-password' }, expect: everyone(400) },
  { route: 'POST /api/account/password', path: '/api/account/password', body: { currentPassword: 'wrong-password', newPassword: 'a-long-enough-password' }, expect: signedIn(422) },
  { route: 'GET /api/invitations/[token]', path: `/api/invitations/${'y'.repeat(43)}`, expect: everyone(404) },
  { route: 'POST /api/invitations/[token]/accept', path: `/api/invitations/${'y'.repeat(43)}/accept`, body: { password: 'a-long-enough-password' }, expect: everyone(404) },
  {
    route: 'POST /api/invitations', path: '/api/invitations', mutates: true,
    body: { role: 'handler', clientId: CLIENT_A, email: 'new.handler@example.test', name: 'New Handler' },
    expect: { anonymous: 401, handlerA: 403, handlerB: 403, trainerA: 201, trainerB: 404, admin: 201 },
  },
  {
    route: 'GET /api/clients', path: '/api/clients?pageSize=200',
    expect: {
      anonymous: 401,
      handlerA: { status: 200, check: r => expect(ids(r)).toEqual([CLIENT_A]) },
      handlerB: { status: 200, check: r => expect(ids(r)).toEqual([CLIENT_B]) },
      trainerA: { status: 200, check: r => { expect(ids(r)).toContain(CLIENT_A); expect(ids(r)).not.toContain(CLIENT_B) } },
      trainerB: { status: 200, check: r => { expect(ids(r)).toContain(CLIENT_B); expect(ids(r)).not.toContain(CLIENT_A) } },
      admin: { status: 200, check: r => { expect(ids(r)).toContain(CLIENT_A); expect(ids(r)).toContain(CLIENT_B) } },
    },
  },
  {
    route: 'GET /api/clients/[id]', path: `/api/clients/${CLIENT_A}`,
    expect: { anonymous: 401, handlerA: 200, handlerB: 404, trainerA: 200, trainerB: 404, admin: 200 },
  },
  { route: 'GET /api/users', path: '/api/users', expect: adminOnly(200) },
  { route: 'PATCH /api/users/[id]', path: `/api/users/${TRAINER3_ID}`, body: { name: 'Ines Okoro' }, expect: adminOnly(200) },
]

function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = join(dir, name)
    return statSync(full).isDirectory() ? routeFiles(full) : [full]
  })
}

/** "server/api/clients/[id].get.ts" → "GET /api/clients/[id]" */
export function routeOfFile(file: string): string {
  const rel = relative(resolve(import.meta.dirname, '../../server'), file).replace(/\\/g, '/')
  const m = rel.match(/^(.*?)(?:\.(get|post|put|patch|delete))?\.ts$/)
  if (!m) throw new Error(`Unexpected route file ${rel}`)
  const method = (m[2] ?? 'ALL').toUpperCase()
  const path = `/${m[1]}`.replace(/\/index$/, '')
  return `${method} ${path}`
}

const agents = new Map<Actor, Agent>()
async function agentFor(actor: Actor, fresh: boolean): Promise<Agent> {
  const email = ACTORS[actor]
  if (!email) return new Agent(baseUrl)
  if (!fresh && agents.has(actor)) return agents.get(actor)!
  const agent = await signIn(baseUrl, email)
  agents.set(actor, agent)
  return agent
}

describe('authorization matrix', () => {
  it('has a row for every route file under server/api', () => {
    const routes = routeFiles(resolve(import.meta.dirname, '../../server/api')).map(routeOfFile).sort()
    const covered = new Set(ROWS.map(r => r.route))
    const missing = routes.filter(r => !covered.has(r))
    expect(missing, `Routes without a row in the authorization matrix: ${missing.join(', ')}`).toEqual([])
    const stale = [...covered].filter(r => !routes.includes(r))
    expect(stale, `Rows for routes that no longer exist: ${stale.join(', ')}`).toEqual([])
  })

  for (const row of ROWS) {
    describe(row.route, () => {
      for (const actor of Object.keys(ACTORS) as Actor[]) {
        const want = row.expect[actor]
        const status = typeof want === 'number' ? want : want.status
        it(`${actor} → ${status}`, async () => {
          if (row.mutates) { await resetDatabase(databaseUrl); agents.clear() }
          const agent = await agentFor(actor, !!row.mutates)
          const [method] = row.route.split(' ')
          const path = typeof row.path === 'function' ? row.path(actor) : row.path
          const body = typeof row.body === 'function' ? (row.body as (a: Actor) => unknown)(actor) : row.body
          const res = await agent.request(method!, path, method === 'GET' ? undefined : (body ?? {}))
          expect(res.status, JSON.stringify(res.body)).toBe(status)
          if (typeof want !== 'number') want.check(res)
          if (row.mutates) agents.delete(actor)
        })
      }
    })
  }
})
