// Homework video uploads over the tus protocol, against the built server: a real small video (committed fixtures,
// made with ffmpeg) sent in chunks with tus-js-client, interrupted and resumed, then fetched back by byte ranges.
// The main flow runs twice: with local-disk storage (the shared stack) and with the S3 backend (its own stack with
// the fake S3). Bad input: not a video, over the limit, another household's homework, forged ids, expired uploads.
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { randomBytes, randomUUID } from 'node:crypto'
import { resolve } from 'node:path'
import { createClient, type Client } from '@libsql/client'
import * as tus from 'tus-js-client'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { Agent, signIn } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { filesDirFor, resetDatabase, ROOT, stagingDirFor, startStack, type Stack } from '../support/stack'
import { minimalPdf } from '../support/files'

const FIXTURES = resolve(ROOT, 'tests/fixtures')
const MP4 = readFileSync(resolve(FIXTURES, 'sample-3s.mp4'))
const MOV = readFileSync(resolve(FIXTURES, 'sample-3s.mov'))
const WEBM = readFileSync(resolve(FIXTURES, 'sample-3s.webm'))
const GIB = 1024 * 1024 * 1024

interface Env { baseUrl: string, databaseUrl: string, db: Client, stack: Stack | null }

/** An open homework assignment for a client, written straight into the database (the review half owns the API). */
async function createAssignment(db: Client, clientId: string, state: 'open' | 'done' | 'cancelled' = 'open'): Promise<string> {
  const id = randomUUID()
  await db.execute({
    sql: 'INSERT INTO homework_assignments (id, client_id, title, instructions, due_day, expected_videos, state) VALUES (?, ?, ?, ?, ?, 1, ?)',
    args: [id, clientId, 'Two controls, one target (invented)', 'Film the whole search, from release to reward.', '2099-01-01', state],
  })
  return id
}

const b64 = (s: string) => Buffer.from(s, 'utf8').toString('base64')
function tusHeaders(agent: Agent, extra: Record<string, string> = {}): Record<string, string> {
  return { 'Tus-Resumable': '1.0.0', 'origin': agent.baseUrl, ...(agent.cookie ? { cookie: agent.cookie } : {}), ...extra }
}
async function json(res: Response): Promise<any> {
  const text = await res.text()
  try { return JSON.parse(text) }
  catch { return { raw: text } }
}

/** POST: a new upload; returns the response and its absolute upload URL. */
async function createUpload(env: Env, agent: Agent, opts: { assignmentId?: string, filename?: string, length?: number | null, metadata?: string }) {
  const meta = opts.metadata ?? [
    ...(opts.assignmentId ? [`assignmentId ${b64(opts.assignmentId)}`] : []),
    ...(opts.filename !== undefined ? [`filename ${b64(opts.filename)}`] : []),
  ].join(',')
  const res = await fetch(`${env.baseUrl}/api/homework-uploads`, {
    method: 'POST',
    headers: tusHeaders(agent, { ...(opts.length === null ? {} : { 'Upload-Length': String(opts.length ?? MP4.length) }), ...(meta ? { 'Upload-Metadata': meta } : {}) }),
  })
  const location = res.headers.get('location')
  return { res, url: location ? new URL(location, env.baseUrl).href : '' }
}
function patch(agent: Agent, url: string, offset: number, body: Uint8Array) {
  return fetch(url, { method: 'PATCH', headers: tusHeaders(agent, { 'Upload-Offset': String(offset), 'Content-Type': 'application/offset+octet-stream' }), body: new Uint8Array(body) })
}
function head(agent: Agent, url: string) {
  return fetch(url, { method: 'HEAD', headers: tusHeaders(agent) })
}
const idOf = (url: string) => url.split('/').pop()!

/** Sends the first `send` bytes of a PATCH that declares `body.length`, then drops the connection (a phone going offline). */
function patchAndDrop(agent: Agent, url: string, offset: number, body: Buffer, send: number): Promise<void> {
  return new Promise((done) => {
    const u = new URL(url)
    const req = httpRequest({
      host: u.hostname, port: u.port, path: u.pathname, method: 'PATCH',
      headers: { ...tusHeaders(agent, { 'Upload-Offset': String(offset), 'Content-Type': 'application/offset+octet-stream' }), 'Content-Length': String(body.length) },
    })
    req.on('error', () => done())
    req.on('response', r => { r.resume(); r.on('end', () => done()) })
    req.write(body.subarray(0, send), () => setTimeout(() => { req.destroy(); done() }, 300))
  })
}

async function waitUntil(what: string, check: () => Promise<boolean>, timeoutMs = 15_000) {
  const deadline = Date.now() + timeoutMs
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`Gave up waiting: ${what}`)
    await new Promise(r => setTimeout(r, 200))
  }
}

async function count(db: Client, sql: string, args: any[] = []): Promise<number> {
  return Number((await db.execute({ sql, args })).rows[0]!.n)
}
function stagedFiles(env: Env): string[] {
  const dir = stagingDirFor(env.databaseUrl)
  return existsSync(dir) ? readdirSync(dir) : []
}

/** Sends a whole buffer with tus-js-client, in chunks, as the browser would. */
function tusUpload(env: Env, agent: Agent, data: Buffer, opts: { assignmentId: string, filename: string, chunkSize: number, uploadUrl?: string, abortAfterBytes?: number }) {
  return new Promise<{ url: string, videoId: string | null, aborted: boolean, error?: any }>((done) => {
    let aborted = false
    const upload = new tus.Upload(data, {
      endpoint: `${env.baseUrl}/api/homework-uploads`,
      uploadUrl: opts.uploadUrl ?? null,
      chunkSize: opts.chunkSize,
      retryDelays: [],
      headers: { cookie: agent.cookie, origin: agent.baseUrl },
      metadata: { assignmentId: opts.assignmentId, filename: opts.filename, filetype: 'video/mp4' },
      onChunkComplete: (_chunk, accepted) => {
        if (opts.abortAfterBytes !== undefined && accepted >= opts.abortAfterBytes && !aborted) {
          aborted = true
          upload.abort().then(() => done({ url: upload.url!, videoId: null, aborted: true }))
        }
      },
      onSuccess: (payload) => done({ url: upload.url!, videoId: payload.lastResponse.getHeader('Homework-Video-Id') ?? null, aborted: false }),
      onError: error => done({ url: upload.url ?? '', videoId: null, aborted: false, error }),
    })
    upload.start()
  })
}

async function fetchVideo(env: Env, agent: Agent, videoId: string, range?: string) {
  return fetch(`${env.baseUrl}/api/homework-videos/${videoId}/file`, { headers: { cookie: agent.cookie, ...(range ? { range } : {}) } })
}

// ---------------------------------------------------------------------------------------------------------------

function mainFlow(name: 'local disk' | 'S3', getEnv: () => Env) {
  describe(`homework upload with ${name} storage`, () => {
    let env: Env
    let handler: Agent, handlerB: Agent, trainer: Agent, trainerB: Agent, admin: Agent
    let assignmentId = ''
    let videoId = ''

    beforeAll(async () => {
      env = getEnv()
      ;[handler, handlerB, trainer, trainerB, admin] = await Promise.all([HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B, ADMIN].map(e => signIn(env.baseUrl, e))) as [Agent, Agent, Agent, Agent, Agent]
      assignmentId = await createAssignment(env.db, CLIENT_A)
    })

    it('sends an MP4 in chunks, is interrupted part way, resumes from the server\'s offset and finishes', async () => {
      const chunk = 8 * 1024
      const first = await tusUpload(env, handler, MP4, { assignmentId, filename: 'Kitchen search.mp4', chunkSize: chunk, abortAfterBytes: 3 * chunk })
      expect(first.error).toBeUndefined()
      expect(first.aborted).toBe(true)
      expect(first.url).toMatch(/\/api\/homework-uploads\/[a-f0-9]{32}$/)
      // The server holds part of it, recorded as an upload in progress, not as a video.
      const h = await head(handler, first.url)
      expect(h.status).toBe(200)
      const offset = Number(h.headers.get('upload-offset'))
      expect(offset).toBeGreaterThanOrEqual(3 * chunk)
      expect(offset).toBeLessThan(MP4.length)
      expect(Number(h.headers.get('upload-length'))).toBe(MP4.length)
      expect(await count(env.db, 'SELECT count(*) AS n FROM homework_uploads WHERE id = ? AND assignment_id = ?', [idOf(first.url), assignmentId])).toBe(1)
      expect(await count(env.db, 'SELECT count(*) AS n FROM homework_videos WHERE assignment_id = ?', [assignmentId])).toBe(0)

      // Then the phone drops the connection in the middle of a request: the bytes that arrived are kept.
      await patchAndDrop(handler, first.url, offset, MP4.subarray(offset, offset + chunk), 3000)
      const afterDrop = Number((await head(handler, first.url)).headers.get('upload-offset'))
      expect(afterDrop).toBeGreaterThanOrEqual(offset)
      expect(afterDrop).toBeLessThanOrEqual(offset + 3000)

      // Resuming (the same URL, as after a reload) asks the server where it stands and sends only the rest.
      const second = await tusUpload(env, handler, MP4, { assignmentId, filename: 'Kitchen search.mp4', chunkSize: chunk, uploadUrl: first.url })
      expect(second.error).toBeUndefined()
      expect(second.url).toBe(first.url)
      expect(second.videoId).toMatch(/^[0-9a-f-]{36}$/)
      videoId = second.videoId!

      const [video] = (await env.db.execute({ sql: 'SELECT * FROM homework_videos WHERE id = ?', args: [videoId] })).rows
      expect(video).toMatchObject({ assignment_id: assignmentId, client_id: CLIENT_A, file_name: 'Kitchen search.mp4', content_type: 'video/mp4', size: MP4.length })
      // The fixture is 3 s long (ffmpeg lavfi sources with duration=3; the AAC track adds a few hundredths).
      expect(Number(video!.duration_seconds)).toBeCloseTo(3, 0)
      expect(String(video!.storage_key)).toBe(`homework/${CLIENT_A}/${videoId}.mp4`)
      expect(await count(env.db, 'SELECT count(*) AS n FROM homework_uploads WHERE id = ?', [idOf(first.url)])).toBe(0)
      expect(await count(env.db, 'SELECT count(*) AS n FROM audit_log WHERE action = ? AND entity_id = ? AND client_id = ?', ['homework.video_uploaded', videoId, CLIENT_A])).toBe(1)
      expect(stagedFiles(env).filter(f => f.startsWith(idOf(first.url)))).toEqual([])
      if (name === 'local disk') {
        expect(readFileSync(resolve(filesDirFor(env.databaseUrl), String(video!.storage_key))).equals(MP4)).toBe(true)
      }
      else {
        const res = await fetch(`${env.stack!.s3!.endpoint}/${env.stack!.s3!.bucket}/${String(video!.storage_key)}`)
        expect(Buffer.from(await res.arrayBuffer()).equals(MP4)).toBe(true)
      }
      // A finished upload is no longer resumable (a HEAD right after, as from a lost answer, still says complete).
      const done = await head(handler, first.url)
      expect([200, 404]).toContain(done.status)
      if (done.status === 200) expect(done.headers.get('homework-video-id')).toBe(videoId)
    })

    it('serves the video whole and by byte ranges, with its type, inline, nosniff', async () => {
      const whole = await fetchVideo(env, handler, videoId)
      expect(whole.status).toBe(200)
      expect(whole.headers.get('content-type')).toBe('video/mp4')
      expect(whole.headers.get('accept-ranges')).toBe('bytes')
      expect(whole.headers.get('x-content-type-options')).toBe('nosniff')
      expect(whole.headers.get('content-disposition')).toMatch(/^inline; filename="Kitchen search\.mp4"/)
      expect(Number(whole.headers.get('content-length'))).toBe(MP4.length)
      expect(Buffer.from(await whole.arrayBuffer()).equals(MP4)).toBe(true)

      for (const [header, start, end] of [['bytes=0-1', 0, 1], ['bytes=1000-20999', 1000, 20999], [`bytes=${MP4.length - 100}-`, MP4.length - 100, MP4.length - 1], ['bytes=-500', MP4.length - 500, MP4.length - 1]] as const) {
        const res = await fetchVideo(env, trainer, videoId, header)
        expect(res.status, header).toBe(206)
        expect(res.headers.get('content-range')).toBe(`bytes ${start}-${end}/${MP4.length}`)
        expect(Number(res.headers.get('content-length'))).toBe(end - start + 1)
        expect(Buffer.from(await res.arrayBuffer()).equals(MP4.subarray(start, end + 1)), header).toBe(true)
      }
      const past = await fetchVideo(env, admin, videoId, `bytes=${MP4.length}-`)
      expect(past.status).toBe(416)
      expect(past.headers.get('content-range')).toBe(`bytes */${MP4.length}`)

      // Another household, another trainer, nobody signed in: as if it did not exist.
      expect((await fetchVideo(env, handlerB, videoId)).status).toBe(404)
      expect((await fetchVideo(env, trainerB, videoId)).status).toBe(404)
      expect((await fetch(`${env.baseUrl}/api/homework-videos/${videoId}/file`)).status).toBe(401)
      expect((await fetchVideo(env, handler, randomUUID())).status).toBe(404)
    })

    it('accepts MOV and WebM by their bytes and reads their durations', async () => {
      for (const [bytes, file, type] of [[MOV, 'Küche, Probe 2.MOV', 'video/quicktime'], [WEBM, 'clip.webm', 'video/webm']] as const) {
        const { res, url } = await createUpload(env, handler, { assignmentId, filename: file, length: bytes.length })
        expect(res.status, JSON.stringify(await json(res.clone()))).toBe(201)
        const done = await patch(handler, url, 0, bytes)
        expect(done.status).toBe(204)
        const id = done.headers.get('homework-video-id')!
        const [video] = (await env.db.execute({ sql: 'SELECT file_name, content_type, duration_seconds, size FROM homework_videos WHERE id = ?', args: [id] })).rows
        expect(video).toMatchObject({ file_name: file, content_type: type, size: bytes.length })
        expect(Number(video!.duration_seconds)).toBeCloseTo(3, 0)
        const range = await fetchVideo(env, trainer, id, 'bytes=0-15')
        expect(range.status).toBe(206)
        expect(range.headers.get('content-type')).toBe(type)
        // The name travels base64-encoded in Upload-Metadata (tus 1.0.0) and comes back RFC 5987-encoded (ü is C3 BC, from memory).
        if (type === 'video/quicktime') expect(range.headers.get('content-disposition')).toBe('inline; filename="Kuche, Probe 2.mov"; filename*=UTF-8\'\'K%C3%BCche%2C%20Probe%202.mov')
        expect(Buffer.from(await range.arrayBuffer()).equals(bytes.subarray(0, 16))).toBe(true)
      }
    })
  })
}

// ---------------------------------------------------------------------------------------------------------------

const shared: Env = { baseUrl: inject('baseUrl'), databaseUrl: inject('databaseUrl'), db: createClient({ url: inject('databaseUrl') }), stack: null }
let s3Env: Env | null = null

beforeAll(async () => {
  await resetDatabase(shared.databaseUrl)
  const stack = await startStack({ label: 'homework-s3', storage: 's3' })
  s3Env = { baseUrl: stack.baseUrl, databaseUrl: stack.databaseUrl, db: createClient({ url: stack.databaseUrl }), stack }
})
afterAll(async () => {
  shared.db.close()
  s3Env?.db.close()
  await s3Env?.stack?.stop()
})

mainFlow('local disk', () => shared)
mainFlow('S3', () => s3Env!)

describe('homework upload: storage down at the end (S3)', () => {
  it('answers 503 with a message, keeps the upload, and finishes when storage is back', async () => {
    const env = s3Env!
    const handler = await signIn(env.baseUrl, HANDLER_A)
    const assignmentId = await createAssignment(env.db, CLIENT_A)
    const { res, url } = await createUpload(env, handler, { assignmentId, filename: 'down.mp4' })
    expect(res.status).toBe(201)
    env.stack!.s3!.setDown(true)
    let body
    try {
      const last = await patch(handler, url, 0, MP4)
      expect(last.status).toBe(503)
      body = await json(last)
    }
    finally { env.stack!.s3!.setDown(false) }
    expect(body.message).toMatch(/could not be stored just now, and nothing was lost/)
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_videos WHERE assignment_id = ?', [assignmentId])).toBe(0)
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_uploads WHERE id = ?', [idOf(url)])).toBe(1)
    // tus-js-client's retry starts with a HEAD: every byte is there, so the server finishes the video now.
    const resumed = await head(handler, url)
    expect(resumed.status).toBe(200)
    expect(Number(resumed.headers.get('upload-offset'))).toBe(MP4.length)
    const videoId = resumed.headers.get('homework-video-id')
    expect(videoId).toBeTruthy()
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_videos WHERE id = ? AND assignment_id = ?', [videoId, assignmentId])).toBe(1)
    const range = await fetchVideo(env, handler, videoId!, 'bytes=100-199')
    expect(Buffer.from(await range.arrayBuffer()).equals(MP4.subarray(100, 200))).toBe(true)
  })
})

describe('homework upload: bad input', () => {
  const env = shared
  let handler: Agent, handlerB: Agent, trainer: Agent
  let assignmentId = ''

  beforeAll(async () => {
    ;[handler, handlerB, trainer] = await Promise.all([HANDLER_A, HANDLER_B, TRAINER_A].map(e => signIn(env.baseUrl, e))) as [Agent, Agent, Agent]
    assignmentId = await createAssignment(env.db, CLIENT_A)
  })

  async function nothingStored(forAssignment = assignmentId) {
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_uploads WHERE assignment_id = ?', [forAssignment])).toBe(0)
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_videos WHERE assignment_id = ?', [forAssignment])).toBe(0)
  }

  it('refuses a file that is not a video by its bytes (415), whatever its name, and keeps nothing', async () => {
    const pdf = Buffer.from(minimalPdf('Not a video (invented).'))
    const { res, url } = await createUpload(env, handler, { assignmentId, filename: 'session.mp4', length: pdf.length })
    expect(res.status).toBe(201)
    const refused = await patch(handler, url, 0, pdf)
    expect(refused.status).toBe(415)
    expect((await json(refused)).message).toMatch(/not a video we can play \(MP4, MOV or WebM\)/)
    await nothingStored()
    expect(stagedFiles(env).filter(f => f.startsWith(idOf(url)))).toEqual([])
    expect((await head(handler, url)).status).toBe(404)

    // A large non-video is refused on its first bytes, before the rest is taken in.
    const big = Buffer.concat([Buffer.from('PK\x03\x04'), randomBytes(64 * 1024)])
    const second = await createUpload(env, handler, { assignmentId, filename: 'video.mov', length: big.length })
    const r2 = await patch(handler, second.url, 0, big)
    expect(r2.status).toBe(415)
    await nothingStored()
  })

  it('decides by the bytes even when the first requests carry only a few of them', async () => {
    // A video sent 6 bytes at a time at first: too few to tell, so the check waits for more, then accepts it.
    const { url } = await createUpload(env, handler, { assignmentId, filename: 'slow start.mp4' })
    expect((await patch(handler, url, 0, MP4.subarray(0, 6))).status).toBe(204)
    expect((await patch(handler, url, 6, MP4.subarray(6, 12))).status).toBe(204)
    const last = await patch(handler, url, 12, MP4.subarray(12))
    expect(last.status).toBe(204)
    const videoId = last.headers.get('homework-video-id')
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_videos WHERE id = ? AND content_type = ?', [videoId, 'video/mp4'])).toBe(1)
    await env.db.execute({ sql: 'DELETE FROM homework_videos WHERE id = ?', args: [videoId] })

    // A tiny file that never says what it is: refused when its last byte arrives.
    const tiny = Buffer.from('just some text, not a video')
    const t = await createUpload(env, handler, { assignmentId, filename: 'tiny.webm', length: tiny.length })
    expect((await patch(handler, t.url, 0, tiny.subarray(0, 4))).status).toBe(204)
    const refused = await patch(handler, t.url, 4, tiny.subarray(4))
    expect(refused.status).toBe(415)
    await nothingStored()
  })

  it('refuses a video over the admin\'s limit (413) before any byte is sent, and more bytes than declared', async () => {
    const { res } = await createUpload(env, handler, { assignmentId, filename: 'long.mp4', length: 2 * GIB + 1 })
    expect(res.status).toBe(413)
    // The default limit is 2 GiB (the requirement).
    expect((await json(res)).message).toMatch(/larger than the limit of 2048 MB/)
    await nothingStored()
    const exact = await createUpload(env, handler, { assignmentId, filename: 'exact.mp4', length: 2 * GIB })
    expect(exact.res.status).toBe(201)
    expect((await fetch(exact.url, { method: 'DELETE', headers: tusHeaders(handler) })).status).toBe(204)

    // The admin lowers the limit: the same policy decides.
    const admin = await signIn(env.baseUrl, ADMIN)
    const set = await admin.request('PUT', '/api/settings/homework-uploads', { maxUploadMegabytes: 1, staleUploadHours: 24 })
    expect(set.status, JSON.stringify(set.body)).toBe(200)
    try {
      const over = await createUpload(env, handler, { assignmentId, filename: 'two-mb.mp4', length: 2 * 1024 * 1024 })
      expect(over.res.status).toBe(413)
      expect((await json(over.res)).message).toMatch(/limit of 1(\.0)? MB/)
    }
    finally {
      expect((await admin.request('PUT', '/api/settings/homework-uploads', { maxUploadMegabytes: 2048, staleUploadHours: 24 })).status).toBe(200)
    }

    const { url } = await createUpload(env, handler, { assignmentId, filename: 'short.mp4', length: 100 })
    const tooMany = await patch(handler, url, 0, MP4.subarray(0, 5000))
    expect(tooMany.status).toBe(413)
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_videos WHERE assignment_id = ?', [assignmentId])).toBe(0)
    await fetch(url, { method: 'DELETE', headers: tusHeaders(handler) })
    await nothingStored()
  })

  it('refuses another household\'s homework (404), a trainer (403), a closed assignment (422) and missing details (400)', async () => {
    const b = await createUpload(env, handlerB, { assignmentId, filename: 'x.mp4' })
    expect(b.res.status).toBe(404)
    expect((await json(b.res)).message).toMatch(/not for your household/)
    const unknown = await createUpload(env, handler, { assignmentId: randomUUID(), filename: 'x.mp4' })
    expect(unknown.res.status).toBe(404)
    const t = await createUpload(env, trainer, { assignmentId, filename: 'x.mp4' })
    expect(t.res.status).toBe(403)
    const closed = await createAssignment(env.db, CLIENT_A, 'done')
    const c = await createUpload(env, handler, { assignmentId: closed, filename: 'x.mp4' })
    expect(c.res.status).toBe(422)
    expect((await json(c.res)).message).toMatch(/already marked done/)
    expect((await createUpload(env, handler, { filename: 'x.mp4' })).res.status).toBe(400)
    expect((await createUpload(env, handler, { assignmentId })).res.status).toBe(400)
    expect((await createUpload(env, handler, { assignmentId, filename: 'x.mp4', length: null })).res.status).toBe(400)
    expect((await createUpload(env, handler, { assignmentId, filename: 'x.mp4', length: 0 })).res.status).toBe(400)
    expect((await createUpload(env, handler, { metadata: 'assignmentId !!!not-base64' })).res.status).toBe(400)
    expect((await createUpload(env, new Agent(env.baseUrl), { assignmentId, filename: 'x.mp4' })).res.status).toBe(401)
    const noTus = await fetch(`${env.baseUrl}/api/homework-uploads`, { method: 'POST', headers: { 'cookie': handler.cookie, 'origin': env.baseUrl, 'Upload-Length': '10' } })
    expect(noTus.status).toBe(412)
    // From another website: refused by the origin check before anything else.
    const cross = await fetch(`${env.baseUrl}/api/homework-uploads`, { method: 'POST', headers: tusHeaders(handler, { 'Upload-Length': '10', origin: 'https://elsewhere.example', 'Upload-Metadata': `assignmentId ${b64(assignmentId)},filename ${b64('x.mp4')}` }) })
    expect(cross.status).toBe(403)
    await nothingStored()
    await nothingStored(closed)
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_uploads WHERE client_id = ?', [CLIENT_B])).toBe(0)
  })

  it('answers 404 to a forged upload id, and to someone else\'s upload, and changes nothing', async () => {
    const { url } = await createUpload(env, handler, { assignmentId, filename: 'mine.mp4' })
    expect((await patch(handler, url, 0, MP4.subarray(0, 10_000))).status).toBe(204)
    const forged = `${env.baseUrl}/api/homework-uploads/${randomBytes(16).toString('hex')}`
    expect((await head(handler, forged)).status).toBe(404)
    expect((await patch(handler, forged, 0, MP4.subarray(0, 100))).status).toBe(404)
    expect((await fetch(`${env.baseUrl}/api/homework-uploads/..%2F..%2Fetc`, { method: 'HEAD', headers: tusHeaders(handler) })).status).toBe(404)
    // Handler B (and the household's trainer) cannot look at or add to handler A's upload.
    for (const other of [handlerB, trainer]) {
      expect((await head(other, url)).status).toBe(404)
      const res = await patch(other, url, 10_000, MP4.subarray(10_000, 20_000))
      expect(res.status).toBe(404)
      expect((await json(res)).message).toMatch(/not one you started/)
      expect((await fetch(url, { method: 'DELETE', headers: tusHeaders(other) })).status).toBe(404)
    }
    expect(Number((await head(handler, url)).headers.get('upload-offset'))).toBe(10_000)
    // The owner gives up: row and staged bytes go.
    expect((await fetch(url, { method: 'DELETE', headers: tusHeaders(handler) })).status).toBe(204)
    await nothingStored()
    expect(stagedFiles(env).filter(f => f.startsWith(idOf(url)))).toEqual([])
  })

  it('stops an upload when its homework is cancelled meanwhile (422), or its handler leaves the household (404)', async () => {
    const cancelledLater = await createAssignment(env.db, CLIENT_A)
    const { url } = await createUpload(env, handler, { assignmentId: cancelledLater, filename: 'late.mp4' })
    expect((await patch(handler, url, 0, MP4.subarray(0, 8000))).status).toBe(204)
    await env.db.execute({ sql: 'UPDATE homework_assignments SET state = ? WHERE id = ?', args: ['cancelled', cancelledLater] })
    const refused = await patch(handler, url, 8000, MP4.subarray(8000))
    expect(refused.status).toBe(422)
    expect((await json(refused)).message).toMatch(/cancelled by your trainer while the video was being sent/)
    await nothingStored(cancelledLater)
    expect(stagedFiles(env).filter(f => f.startsWith(idOf(url)))).toEqual([])

    const second = await createUpload(env, handler, { assignmentId, filename: 'leaving.mp4' })
    expect((await patch(handler, second.url, 0, MP4.subarray(0, 8000))).status).toBe(204)
    const link = (await env.db.execute({ sql: 'SELECT * FROM client_handlers WHERE client_id = ? AND user_id = (SELECT id FROM users WHERE email = ?)', args: [CLIENT_A, HANDLER_A] })).rows[0]!
    await env.db.execute({ sql: 'DELETE FROM client_handlers WHERE client_id = ? AND user_id = ?', args: [link.client_id!, link.user_id!] })
    try {
      expect((await patch(handler, second.url, 8000, MP4.subarray(8000))).status).toBe(404)
      expect((await head(handler, second.url)).status).toBe(404)
    }
    finally {
      await env.db.execute({ sql: 'INSERT INTO client_handlers (client_id, user_id, relationship, created_at) VALUES (?, ?, ?, ?)', args: [link.client_id!, link.user_id!, link.relationship!, link.created_at!] })
    }
    expect((await fetch(second.url, { method: 'DELETE', headers: tusHeaders(handler) })).status).toBe(204)
    await nothingStored()
  })

  it('removes expired uploads: at once when resumed (410), and by the periodic cleanup', async () => {
    const a = await createUpload(env, handler, { assignmentId, filename: 'a.mp4' })
    const b = await createUpload(env, handler, { assignmentId, filename: 'b.mp4' })
    expect((await patch(handler, a.url, 0, MP4.subarray(0, 8000))).status).toBe(204)
    expect((await patch(handler, b.url, 0, MP4.subarray(0, 8000))).status).toBe(204)
    expect(stagedFiles(env).filter(f => f.startsWith(idOf(b.url))).length).toBeGreaterThan(0)
    // Both waited longer than the policy's hours without progress.
    await env.db.execute({ sql: 'UPDATE homework_uploads SET expires_at = ? WHERE id IN (?, ?)', args: [Date.now() - 60_000, idOf(a.url), idOf(b.url)] })

    const resumed = await head(handler, a.url)
    expect(resumed.status).toBe(410)
    expect(await count(env.db, 'SELECT count(*) AS n FROM homework_uploads WHERE id = ?', [idOf(a.url)])).toBe(0)
    expect(stagedFiles(env).filter(f => f.startsWith(idOf(a.url)))).toEqual([])

    // Nobody comes back for b: the cleanup job (every second in tests) removes its row and its staged bytes.
    await waitUntil('the cleanup removed the expired upload', async () =>
      await count(env.db, 'SELECT count(*) AS n FROM homework_uploads WHERE id = ?', [idOf(b.url)]) === 0
      && stagedFiles(env).filter(f => f.startsWith(idOf(b.url))).length === 0)
    expect((await head(handler, b.url)).status).toBe(404)
    await nothingStored()
  })

  it('removes staged files that have no upload row (left by a crash) once they are old', async () => {
    const dir = stagingDirFor(env.databaseUrl)
    mkdirSync(dir, { recursive: true })
    const old = randomBytes(16).toString('hex')
    const fresh = randomBytes(16).toString('hex')
    for (const id of [old, fresh]) {
      writeFileSync(resolve(dir, id), MP4.subarray(0, 1000))
      writeFileSync(resolve(dir, `${id}.json`), JSON.stringify({ id, size: MP4.length, offset: 0 }))
    }
    const hourAgo = new Date(Date.now() - 3_600_000)
    utimesSync(resolve(dir, old), hourAgo, hourAgo)
    utimesSync(resolve(dir, `${old}.json`), hourAgo, hourAgo)
    await waitUntil('the cleanup removed the orphaned staging files', async () => stagedFiles(env).filter(f => f.startsWith(old)).length === 0)
    // A file just written may belong to an upload being created this moment: it stays.
    expect(stagedFiles(env).filter(f => f.startsWith(fresh)).sort()).toEqual([fresh, `${fresh}.json`])
    rmSync(resolve(dir, fresh))
    rmSync(resolve(dir, `${fresh}.json`))
  })
})
