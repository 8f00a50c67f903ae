// Roster speed with 10,000 clients: seeds a fresh SQLite file (the demo plus 10,000 invented households), starts
// the built server, signs in, and times sorted / filtered / searched / deep pages of GET /api/clients.
// Run: npm run build && npx tsx bench/roster.ts   (figures go to docs/benchmarks.md by hand)
import { spawn } from 'node:child_process'
import { mkdirSync, rmSync } from 'node:fs'
import { resolve } from 'node:path'
import { performance } from 'node:perf_hooks'
import { migrateDatabase, openDatabase, prepareDatabase } from '../server/database/client'
import { seedDemo, DEMO_PASSWORD } from '../scripts/lib/seed-data'
import { freePort } from '../tests/support/stack'

const ROOT = resolve(import.meta.dirname, '..')
const EXTRA = Number(process.env.BENCH_CLIENTS || 10_000)
const RUNS = Number(process.env.BENCH_RUNS || 40)
const dir = resolve(ROOT, 'tests/.tmp')
mkdirSync(dir, { recursive: true })
const file = resolve(dir, 'bench-roster.db')
for (const f of [file, `${file}-wal`, `${file}-shm`]) rmSync(f, { force: true })
const url = `file:${file}`

const t0 = performance.now()
const { client, db } = openDatabase(url)
await prepareDatabase(client, url)
await migrateDatabase(db)
await seedDemo(db, { extraClients: EXTRA })
client.close()
console.log(`Seeded ${EXTRA} extra clients in ${((performance.now() - t0) / 1000).toFixed(1)} s`)

const port = await freePort()
const base = `http://127.0.0.1:${port}`
const server = spawn(process.execPath, [resolve(ROOT, process.env.NUXT_OUTPUT_DIR || '.output', 'server/index.mjs')], {
  env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATABASE_URL: url, NUXT_SESSION_PASSWORD: 'bench-session-password-at-least-32-chars', OUTBOX_WORKER: 'off' },
  stdio: 'ignore',
})
try {
  for (let i = 0; ; i++) {
    try { if ((await fetch(`${base}/api/auth/me`)).status === 401) break }
    catch { /* starting */ }
    if (i > 200) throw new Error('server did not start')
    await new Promise(r => setTimeout(r, 100))
  }
  async function cookieFor(email: string) {
    const res = await fetch(`${base}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json', 'origin': base }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) })
    return res.headers.getSetCookie()[0]!.split(';')[0]!
  }
  const who = { admin: await cookieFor('admin@forescent.test'), trainer: await cookieFor('trainer@forescent.test') }
  const scenarios: [string, keyof typeof who, string][] = [
    ['admin, first page, household A→Z', 'admin', 'sort=household&dir=asc&pageSize=25'],
    ['admin, sorted by dog Z→A', 'admin', 'sort=dog&dir=desc&pageSize=25'],
    ['admin, condition + stage filter, by start date', 'admin', 'condition=seizure&status=active&sort=started&dir=desc&pageSize=50'],
    ['admin, search "Hollis"', 'admin', 'q=Hollis&sort=household&pageSize=25'],
    ['admin, search by dog "Nutmeg"', 'admin', 'q=Nutmeg&sort=updated&dir=desc&pageSize=25'],
    ['admin, page 300 of 25', 'admin', 'sort=household&page=300&pageSize=25'],
    ['trainer (~3,300 clients), by trainer filter + sort', 'trainer', 'sort=started&dir=asc&pageSize=100'],
  ]
  const lines = ['| scenario | rows / total | p50 ms | p95 ms | max ms |', '|---|---|---|---|---|']
  for (const [label, as, query] of scenarios) {
    const times: number[] = []
    let last: { rows: unknown[], total: number } = { rows: [], total: 0 }
    for (let i = 0; i < RUNS + 3; i++) {
      const start = performance.now()
      const res = await fetch(`${base}/api/clients?${query}`, { headers: { cookie: who[as] } })
      last = await res.json() as typeof last
      if (i >= 3) times.push(performance.now() - start) // three warm-up requests
    }
    times.sort((a, b) => a - b)
    const p = (q: number) => times[Math.min(times.length - 1, Math.floor(q * times.length))]!.toFixed(1)
    lines.push(`| ${label} | ${last.rows.length} / ${last.total} | ${p(0.5)} | ${p(0.95)} | ${times[times.length - 1]!.toFixed(1)} |`)
  }
  console.log(`\nGET /api/clients with ${EXTRA + 8} clients, ${RUNS} sequential requests each (after 3 warm-up):\n`)
  console.log(lines.join('\n'))
}
finally {
  server.kill('SIGTERM')
}
