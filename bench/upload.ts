// Server memory while a 1 GiB homework video streams in over tus: starts the built server (fresh SQLite file with
// the demo), signs in as a handler, creates a 1 GiB upload and sends it in 50 MiB PATCHes, sampling the server
// process's resident memory (VmRSS in /proc/<pid>/status, every 50 ms) before, during and after, and its lifetime
// peak (VmHWM). The bytes are a real MP4's header boxes (ftyp, moov from tests/fixtures/sample-3s.mp4) followed by
// one large mdat box of filler, so the type check and the duration reading see a plausible phone video.
// Run: npm run build && npm run bench:upload            (BENCH_STORAGE=s3 for the S3 backend against the fake S3;
//      BENCH_MIB=1024 and BENCH_CHUNK_MIB=50 change the sizes). Everything written is removed at the end.
import { spawn } from 'node:child_process'
import { once } from 'node:events'
import { mkdirSync, readFileSync, rmSync, existsSync, readdirSync, statSync } from 'node:fs'
import { request } from 'node:http'
import { resolve } from 'node:path'
import { randomUUID } from 'node:crypto'
import { performance } from 'node:perf_hooks'
import { createClient } from '@libsql/client'
import { migrateDatabase, openDatabase, prepareDatabase } from '../server/database/client'
import { seedDemo, seedId, DEMO_PASSWORD } from '../scripts/lib/seed-data'
import { freePort } from '../tests/support/stack'
import { startFakeS3, type FakeS3 } from '../fake-services/s3/server.mjs'

const ROOT = resolve(import.meta.dirname, '..')
const MIB = 1024 * 1024
const TOTAL = Number(process.env.BENCH_MIB || 1024) * MIB
const CHUNK = Number(process.env.BENCH_CHUNK_MIB || 50) * MIB
const STORAGE = process.env.BENCH_STORAGE === 's3' ? 's3' : 'local'

const work = resolve(ROOT, 'tests/.tmp', `bench-upload-${Date.now()}`)
mkdirSync(work, { recursive: true })
const dbFile = resolve(work, 'bench.db')
const url = `file:${dbFile}`
const filesDir = resolve(work, 'files')
const stagingDir = resolve(work, 'staging')

// --- the bytes: the sample's ftyp and moov boxes, then an mdat box (64-bit size) of filler up to TOTAL -----------
function topBoxes(b: Buffer): { type: string, start: number, end: number }[] {
  const out = []
  for (let at = 0; at + 8 <= b.length;) {
    const size = b.readUInt32BE(at)
    const type = b.toString('latin1', at + 4, at + 8)
    out.push({ type, start: at, end: at + size })
    at += size
  }
  return out
}
const sample = readFileSync(resolve(ROOT, 'tests/fixtures/sample-3s.mp4'))
const header = Buffer.concat(topBoxes(sample).filter(b => b.type === 'ftyp' || b.type === 'moov').map(b => sample.subarray(b.start, b.end)))
const mdatHead = Buffer.alloc(16)
mdatHead.writeUInt32BE(1, 0)
mdatHead.write('mdat', 4, 'latin1')
mdatHead.writeBigUInt64BE(BigInt(TOTAL - header.length), 8)
const prefix = Buffer.concat([header, mdatHead])
const filler = Buffer.alloc(MIB)
for (let i = 0; i < filler.length; i++) filler[i] = (i * 31) % 251

/** The bytes [start, end) of the virtual file, as 1 MiB pieces. */
function* piecesOf(start: number, end: number): Generator<Buffer> {
  for (let at = start; at < end;) {
    if (at < prefix.length) {
      const piece = prefix.subarray(at, Math.min(prefix.length, end))
      yield piece
      at += piece.length
      continue
    }
    const n = Math.min(MIB, end - at)
    yield filler.subarray(0, n)
    at += n
  }
}

// --- memory of the server process -----------------------------------------------------------------------------
function statusKb(pid: number, field: 'VmRSS' | 'VmHWM'): number {
  const m = new RegExp(`^${field}:\\s+(\\d+) kB`, 'm').exec(readFileSync(`/proc/${pid}/status`, 'utf8'))
  return m ? Number(m[1]) : 0
}
const mib = (kb: number) => (kb / 1024).toFixed(0)

let fake: FakeS3 | null = null
const t0 = performance.now()
const { client, db } = openDatabase(url)
await prepareDatabase(client, url)
await migrateDatabase(db)
await seedDemo(db)
client.close()
if (STORAGE === 's3') fake = await startFakeS3({ directory: resolve(work, 's3'), quiet: true })

const port = await freePort()
const base = `http://127.0.0.1:${port}`
const server = spawn(process.execPath, [resolve(ROOT, process.env.NUXT_OUTPUT_DIR || '.output', 'server/index.mjs')], {
  env: {
    ...process.env, NODE_ENV: 'production', PORT: String(port), HOST: '127.0.0.1', DATABASE_URL: url,
    NUXT_SESSION_PASSWORD: 'bench-session-password-at-least-32-chars', OUTBOX_WORKER: 'off', SAMPLE_CHECK: 'off', INVOICE_SCHEDULE: 'off',
    FILES_DIR: filesDir, UPLOAD_STAGING_DIR: stagingDir, ...(fake?.env ?? {}),
  },
  stdio: ['ignore', 'ignore', 'inherit'],
})
const pid = server.pid!

function sampler() {
  let peak = 0
  const timer = setInterval(() => { try { peak = Math.max(peak, statusKb(pid, 'VmRSS')) } catch { /* exited */ } }, 50)
  return { stop: () => { clearInterval(timer); return Math.max(peak, statusKb(pid, 'VmRSS')) } }
}

function patch(cookie: string, path: string, offset: number, end: number): Promise<{ status: number, videoId: string | null, body: string }> {
  return new Promise((done, fail) => {
    const req = request({
      host: '127.0.0.1', port, path, method: 'PATCH',
      headers: { cookie, 'origin': base, 'Tus-Resumable': '1.0.0', 'Upload-Offset': String(offset), 'Content-Type': 'application/offset+octet-stream', 'Content-Length': String(end - offset) },
    }, (res) => {
      let body = ''
      res.on('data', (d) => { body += d })
      res.on('end', () => done({ status: res.statusCode!, videoId: (res.headers['homework-video-id'] as string) ?? null, body }))
    })
    req.on('error', fail)
    ;(async () => {
      for (const piece of piecesOf(offset, end)) {
        if (!req.write(piece)) await once(req, 'drain')
      }
      req.end()
    })().catch(fail)
  })
}

try {
  for (let i = 0; ; i++) {
    try { if ((await fetch(`${base}/api/auth/me`)).status === 401) break }
    catch { /* starting */ }
    if (i > 300) throw new Error('server did not start')
    await new Promise(r => setTimeout(r, 100))
  }
  const login = await fetch(`${base}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json', 'origin': base }, body: JSON.stringify({ email: 'handler@forescent.test', password: DEMO_PASSWORD }) })
  const cookie = login.headers.getSetCookie()[0]!.split(';')[0]!
  const assignmentId = randomUUID()
  const sql = createClient({ url })
  await sql.execute({ sql: 'INSERT INTO homework_assignments (id, client_id, title, instructions, due_day) VALUES (?, ?, ?, ?, ?)', args: [assignmentId, seedId('client:fairweather'), 'Benchmark homework (invented)', 'Film one search.', '2099-01-01'] })
  console.log(`Prepared in ${((performance.now() - t0) / 1000).toFixed(1)} s; storage: ${STORAGE}; ${TOTAL / MIB} MiB in ${CHUNK / MIB} MiB PATCHes`)

  // A few requests so the server is warm, then its idle memory.
  for (let i = 0; i < 5; i++) await fetch(`${base}/api/homework-videos/${randomUUID()}/file`, { headers: { cookie } })
  await new Promise(r => setTimeout(r, 1000))
  const idle = statusKb(pid, 'VmRSS')
  const hwmBefore = statusKb(pid, 'VmHWM')

  const b64 = (s: string) => Buffer.from(s).toString('base64')
  const created = await fetch(`${base}/api/homework-uploads`, { method: 'POST', headers: { cookie, 'origin': base, 'Tus-Resumable': '1.0.0', 'Upload-Length': String(TOTAL), 'Upload-Metadata': `assignmentId ${b64(assignmentId)},filename ${b64('bench.mp4')}` } })
  if (created.status !== 201) throw new Error(`create: ${created.status} ${await created.text()}`)
  const path = created.headers.get('location')!

  const during = sampler()
  const tUp = performance.now()
  let offset = 0
  let lastStart = 0
  let result: Awaited<ReturnType<typeof patch>> | null = null
  while (offset < TOTAL) {
    const end = Math.min(TOTAL, offset + CHUNK)
    if (end === TOTAL) lastStart = performance.now()
    result = await patch(cookie, path, offset, end)
    if (result.status !== 204) throw new Error(`PATCH at ${offset}: ${result.status} ${result.body}`)
    offset = end
  }
  const tDone = performance.now()
  const peakDuring = during.stop()
  await new Promise(r => setTimeout(r, 2000))
  const after = statusKb(pid, 'VmRSS')
  const hwm = statusKb(pid, 'VmHWM')

  const video = (await sql.execute({ sql: 'SELECT size, duration_seconds, storage_key FROM homework_videos WHERE id = ?', args: [result!.videoId] })).rows[0]
  sql.close()
  if (!video || Number(video.size) !== TOTAL) throw new Error('the video was not recorded whole')
  const staged = existsSync(stagingDir) ? readdirSync(stagingDir).length : 0
  const storedBytes = STORAGE === 'local' ? statSync(resolve(filesDir, String(video.storage_key))).size : TOTAL
  const secs = (tDone - tUp) / 1000
  console.log(`\n| storage | file | PATCH size | idle RSS | peak RSS while uploading and finishing | RSS 2 s after | VmHWM before → after | throughput | last PATCH (incl. finish) |`)
  console.log('|---|---|---|---|---|---|---|---|---|')
  console.log(`| ${STORAGE === 's3' ? 'S3 (fake s3rver)' : 'local disk'} | ${TOTAL / MIB} MiB | ${CHUNK / MIB} MiB | ${mib(idle)} MiB | ${mib(peakDuring)} MiB | ${mib(after)} MiB | ${mib(hwmBefore)} → ${mib(hwm)} MiB | ${(TOTAL / MIB / secs).toFixed(0)} MiB/s (${secs.toFixed(1)} s) | ${((tDone - lastStart) / 1000).toFixed(1)} s |`)
  console.log(`\nvideo recorded: ${Number(video.size)} bytes, duration ${video.duration_seconds} s, stored ${storedBytes} bytes; staging files left: ${staged}`)
}
finally {
  server.kill('SIGTERM')
  await once(server, 'exit').catch(() => {})
  await fake?.close()
  rmSync(work, { recursive: true, force: true })
}
