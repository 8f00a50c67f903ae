// The authorization matrix: every file under server/api must have a row saying what each kind of caller gets
// (rows live in tests/integration/authz-rows/*.ts, one file per feature); then every row is exercised against the
// running server.
import { readdirSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { describe, expect, inject, it } from 'vitest'
import { Agent, signIn } from '../support/http'
import { ACTORS, loadRows, type Actor, type Row } from '../support/authz'
import { ADMIN } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')

const ROWS: Row[] = await loadRows()

function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = join(dir, name)
    return statSync(full).isDirectory() ? routeFiles(full) : [full]
  })
}

/** "server/api/clients/[id].get.ts" → "GET /api/clients/[id]" */
function routeOfFile(file: string): string {
  const rel = relative(resolve(import.meta.dirname, '../../server'), file).replace(/\\/g, '/')
  const m = rel.match(/^(.*?)(?:\.(get|post|put|patch|delete))?\.ts$/)
  if (!m) throw new Error(`Unexpected route file ${rel}`)
  const method = (m[2] ?? 'ALL').toUpperCase()
  const path = `/${m[1]}`.replace(/\/index$/, '')
  return `${method} ${path}`
}

const agents = new Map<Actor, Agent>()
// Set after a row that changes data, so the next row starts from the seeded scenario again.
let dirty = false
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
        const label = row.method ? `${row.method}: ` : ''
        const want = row.expect[actor]
        const status = typeof want === 'number' ? want : want.status
        it(`${label}${actor} → ${status}`, async () => {
          if (row.mutates || dirty) { await resetDatabase(databaseUrl); agents.clear(); dirty = false }
          const ctx = row.prepare ? await row.prepare(await signIn(baseUrl, ADMIN)) : {}
          const agent = await agentFor(actor, !!row.mutates)
          const method = row.method ?? row.route.split(' ')[0]
          const path = typeof row.path === 'function' ? row.path(actor, ctx) : row.path
          let res
          if (row.raw) {
            const raw = row.raw(actor, ctx)
            res = await agent.request(method!, path, raw.body as string, { ...(raw.contentType ? { 'content-type': raw.contentType } : {}), ...raw.headers })
          }
          else {
            const body = typeof row.body === 'function' ? (row.body as (a: Actor, c: typeof ctx) => unknown)(actor, ctx) : row.body
            res = await agent.request(method!, path, ['GET', 'HEAD', 'OPTIONS', 'DELETE'].includes(method!) ? undefined : (body ?? {}))
          }
          expect(res.status, JSON.stringify(res.body)).toBe(status)
          if (typeof want !== 'number') want.check(res)
          if (row.mutates) { agents.delete(actor); dirty = true }
        })
      }
    })
  }
})
