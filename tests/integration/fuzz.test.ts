// Property-based fuzzing (fast-check) of every state-changing JSON route in the authorization matrix, as every kind
// of caller: malformed, over-long, wrong-typed, boundary and injection-shaped bodies, whole or one field at a time
// in an otherwise valid body. Every answer must be below 500, and every refused answer (4xx) must leave the
// database exactly as it was (a hash of every table's rows before and after). OWASP ASVS 4.0 V5.1.x, V13.1.x.
// Bounded in time: FUZZ_SECONDS (default 90) shared by all routes; the figures are printed at the end.
import { createHash } from 'node:crypto'
import { readdirSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { createClient, type Client } from '@libsql/client'
import fc from 'fast-check'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent, signIn } from '../support/http'
import { ACTORS, type Actor, type Row } from '../support/authz'
import { ADMIN } from '../support/people'
import { startStack, type Stack } from '../support/stack'

const BUDGET_MS = Number(process.env.FUZZ_SECONDS || 90) * 1000

const rowsDir = resolve(import.meta.dirname, 'authz-rows')
const ROWS: Row[] = []
for (const f of readdirSync(rowsDir).filter(f => f.endsWith('.ts')).sort()) {
  ROWS.push(...((await import(join(rowsDir, f))) as { rows: Row[] }).rows)
}
// Every JSON route that changes something (uploads send files and have their own tests of bad bodies).
const TARGETS = ROWS.filter(r => !r.raw && !['GET', 'HEAD'].includes((r.method ?? r.route.split(' ')[0])!))

// Values that break naive code: wrong types, boundaries, over-long text, injection shapes, odd Unicode.
const nasty = fc.oneof(
  fc.constantFrom(
    null, true, false, 0, -1, 1.5, Number.MAX_SAFE_INTEGER, -Number.MAX_SAFE_INTEGER, 1e308, -0,
    '', ' ', '0', 'true', 'null', '0000-01-01', '9999-12-31', '2026-02-30', '2026-13-01T25:61:00Z', '1e400',
    '\' OR 1=1 --', '"; DROP TABLE users; --', '<script>alert(1)</script>', '../../../../etc/passwd', '%00', '\u0000',
    '{{7*7}}', '${7*7}', '__proto__', 'constructor', '\uD800', '🐕‍🦺', 'x'.repeat(10_000), [], {}, [[[]]], { __proto__: { admin: true } },
  ),
  fc.string({ maxLength: 300 }),
  fc.integer(),
  fc.double(),
  fc.array(fc.anything({ maxDepth: 2 }), { maxLength: 5 }),
  fc.anything({ maxDepth: 2 }),
)

type Body = { json: unknown } | { text: string }
function bodies(valid: unknown): fc.Arbitrary<Body> {
  const whole = fc.oneof(
    nasty.map(json => ({ json })),
    fc.dictionary(fc.string({ maxLength: 20 }), nasty, { maxKeys: 6 }).map(json => ({ json })),
    // Not JSON at all, or cut short.
    fc.constantFrom('{', '{"a":', 'not json', '[1,2', '\u0000\u0001', '{"a":1}}').map(text => ({ text })),
  )
  if (!valid || typeof valid !== 'object' || Array.isArray(valid)) return whole
  const keys = Object.keys(valid)
  if (!keys.length) return whole
  // One field of a good body made bad: gets past the first checks, so deeper code is reached.
  const oneField = fc.tuple(fc.constantFrom(...keys), nasty).map(([k, v]) => ({ json: { ...(valid as object), [k]: v } }))
  return fc.oneof({ weight: 2, arbitrary: oneField }, { weight: 1, arbitrary: whole })
}

let stack: Stack
const agents = new Map<Actor, Agent>()
const figures = { cases: 0, refused: 0, accepted: 0, routes: 0, byStatus: {} as Record<number, number> }

/** A hash of every row of every table, by table. */
async function databaseHash(): Promise<Record<string, string>> {
  // A fresh connection each time: it reads the latest committed state, never an older snapshot.
  const db = createClient({ url: stack.databaseUrl })
  try { return await hashWith(db) }
  finally { db.close() }
}
async function hashWith(db: Client): Promise<Record<string, string>> {
  const tables = (await db.execute('SELECT name FROM sqlite_master WHERE type = \'table\' AND name NOT LIKE \'sqlite_%\' AND name NOT LIKE \'__drizzle%\' ORDER BY name')).rows.map(r => String(r.name))
  const out: Record<string, string> = {}
  for (const t of tables) out[t] = createHash('sha256').update(JSON.stringify((await db.execute(`SELECT * FROM "${t}" ORDER BY rowid`)).rows)).digest('hex')
  return out
}
const changedTables = (a: Record<string, string>, b: Record<string, string>) => Object.keys({ ...a, ...b }).filter(t => a[t] !== b[t])

beforeAll(async () => {
  // A stack of its own with the periodic jobs off, so only the requests themselves change the database.
  stack = await startStack({ label: 'fuzz', env: { OUTBOX_WORKER: 'off', SAMPLE_CHECK: 'off', UPLOAD_CLEANUP: 'off', FILE_SWEEP: 'off', INVOICE_SCHEDULE: 'off' } })
  for (const actor of Object.keys(ACTORS) as Actor[]) {
    const email = ACTORS[actor]
    agents.set(actor, email ? await signIn(stack.baseUrl, email) : new Agent(stack.baseUrl))
  }
}, 120_000)

afterAll(async () => {
  await stack?.stop()
  console.log(`Fuzzing: ${figures.cases} requests over ${figures.routes} route/method pairs and ${agents.size} kinds of caller; ${figures.refused} refused (database unchanged each time), ${figures.accepted} accepted; by status ${JSON.stringify(figures.byStatus)}.`)
})

describe('fuzzing every state-changing route as every caller', () => {
  it('never answers 5xx, and a refused request changes nothing', async () => {
    expect(TARGETS.length).toBeGreaterThan(40)
    const perRoute = Math.max(500, Math.floor(BUDGET_MS / TARGETS.length))
    const failures: string[] = []
    const admin = await signIn(stack.baseUrl, ADMIN)
    for (const row of TARGETS) {
      figures.routes++
      const method = (row.method ?? row.route.split(' ')[0])!
      const ctx = row.prepare ? await row.prepare(admin).catch(() => ({})) : {}
      // Each route gets its share of the time; past it the remaining runs return at once. (Not fast-check's
      // interruptAfterTimeLimit: it stops waiting for a request in flight, whose writes would then land during the
      // next route's checks.) The property never throws: what it finds goes into `failures`.
      const deadline = Date.now() + perRoute
      await fc.check(fc.asyncProperty(fc.constantFrom(...(Object.keys(ACTORS) as Actor[])), fc.constant(null).chain(() => {
        const valid = typeof row.body === 'function' ? (row.body as (a: Actor, c: typeof ctx) => unknown)('admin', ctx) : row.body
        return bodies(valid)
      }), async (actor, body) => {
        if (Date.now() > deadline) return
        const agent = agents.get(actor)!
        const path = typeof row.path === 'function' ? row.path(actor, ctx) : row.path
        const before = await databaseHash()
        const res = 'text' in body
          ? await agent.request(method, path, body.text, { 'content-type': 'application/json' })
          : await agent.request(method, path, body.json === undefined ? null : body.json)
        figures.cases++
        figures.byStatus[res.status] = (figures.byStatus[res.status] ?? 0) + 1
        if (res.status >= 500) failures.push(`${row.route} as ${actor}: ${res.status} for ${JSON.stringify(body).slice(0, 300)}`)
        if (res.status >= 400) {
          figures.refused++
          const after = await databaseHash()
          const changed = changedTables(before, after)
          if (changed.length) failures.push(`${row.route} as ${actor}: refused with ${res.status} but ${changed.join(', ')} changed, for ${JSON.stringify(body).slice(0, 300)}`)
        }
        else figures.accepted++
        // A request that ended the session (sign-out, a password change) leaves this caller signed out: sign in again.
        // (If the fuzzed sign-ins got this account throttled meanwhile, the caller simply stays signed out.)
        if (res.status < 400 && ACTORS[actor] && (row.route.includes('/auth/') || row.route.includes('/account/'))) {
          agents.set(actor, await signIn(stack.baseUrl, ACTORS[actor]!).catch(() => new Agent(stack.baseUrl)))
        }
      }), { numRuns: 200, seed: Number(process.env.FUZZ_SEED || Date.now() % 2 ** 31) })
    }
    expect(failures, failures.join('\n')).toEqual([])
  }, BUDGET_MS + 180_000)
})
