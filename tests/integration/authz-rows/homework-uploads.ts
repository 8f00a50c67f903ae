// Rows for the homework upload routes: the tus endpoint (one route file takes POST, HEAD, PATCH, DELETE and OPTIONS,
// so each method has its own row with `method`) and the video file route.
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { randomUUID } from 'node:crypto'
import { createClient } from '@libsql/client'
import { inject } from 'vitest'
import { CLIENT_A, HANDLER_A } from '../../support/people'
import { clientA, everyone, expect, type Actor, type Ctx, type Row } from '../../support/authz'
import { signIn, type Agent } from '../../support/http'
import { ROOT } from '../../support/stack'

const MP4 = readFileSync(resolve(ROOT, 'tests/fixtures/sample-3s.mp4'))
const b64 = (s: string) => Buffer.from(s).toString('base64')
const TUS = { 'Tus-Resumable': '1.0.0' }

/** An open assignment of client A, written straight into the database (as the upload tests do). */
async function assignment(): Promise<Ctx> {
  const db = createClient({ url: inject('databaseUrl') })
  const id = randomUUID()
  try {
    // The server may hold the write lock for a moment (the periodic sample check after a reset): wait, as it does.
    await db.execute('PRAGMA busy_timeout = 5000')
    await db.execute({
      sql: 'INSERT INTO homework_assignments (id, client_id, title, instructions, due_day, state) VALUES (?, ?, ?, ?, ?, ?)',
      args: [id, CLIENT_A, 'Matrix homework (invented)', 'Film one search.', '2099-01-01', 'open'],
    })
  }
  finally { db.close() }
  return { assignmentId: id }
}

/** As handler A (who films): an upload of the sample video in progress, with its first 1000 bytes sent. */
async function uploadInProgress(): Promise<Ctx> {
  const { assignmentId } = await assignment()
  const handler = await signIn(inject('baseUrl'), HANDLER_A)
  const created = await handler.request('POST', '/api/homework-uploads', '', { ...TUS, 'Upload-Length': String(MP4.length), 'Upload-Metadata': `assignmentId ${b64(assignmentId!)},filename ${b64('matrix.mp4')}` })
  if (created.status !== 201) throw new Error(`Preparing an upload failed: ${created.status} ${JSON.stringify(created.body)}`)
  const id = created.headers.get('location')!.split('/').pop()!
  const sent = await handler.request('PATCH', `/api/homework-uploads/${id}`, new Uint8Array(MP4.subarray(0, 1000)), { ...TUS, 'Upload-Offset': '0', 'content-type': 'application/offset+octet-stream' })
  if (sent.status !== 204) throw new Error(`Preparing an upload failed: ${sent.status} ${JSON.stringify(sent.body)}`)
  return { assignmentId: assignmentId!, uploadId: id }
}

/** As handler A: the sample video sent whole, so a video exists. */
async function video(_admin: Agent): Promise<Ctx> {
  const { uploadId } = await uploadInProgress()
  const handler = await signIn(inject('baseUrl'), HANDLER_A)
  const done = await handler.request('PATCH', `/api/homework-uploads/${uploadId}`, new Uint8Array(MP4.subarray(1000)), { ...TUS, 'Upload-Offset': '1000', 'content-type': 'application/offset+octet-stream' })
  if (done.status !== 204) throw new Error(`Preparing a video failed: ${done.status} ${JSON.stringify(done.body)}`)
  return { videoId: done.headers.get('homework-video-id')! }
}

/** Only the person who started an upload may touch it: everyone else gets 404, like a forged id. */
const ownerOnly = (ok: number): Record<Actor, number> => ({ anonymous: 401, handlerA: ok, handlerB: 404, trainerA: 404, trainerB: 404, admin: 404 })

export const rows: Row[] = [
  {
    route: 'ALL /api/homework-uploads', method: 'POST', path: '/api/homework-uploads', prepare: assignment, mutates: true,
    raw: (_a, ctx) => ({ body: '', headers: { ...TUS, 'Upload-Length': String(MP4.length), 'Upload-Metadata': `assignmentId ${b64(ctx.assignmentId!)},filename ${b64('matrix.mp4')}` } }),
    // The household's handlers film (the office may too); trainers are told to ask the handler; another household: 404.
    expect: {
      anonymous: 401, handlerA: { status: 201, check: r => expect(r.headers.get('location')).toMatch(/^\/api\/homework-uploads\/[a-f0-9]{32}$/) },
      handlerB: 404, trainerA: 403, trainerB: 403, admin: 201,
    },
  },
  { route: 'ALL /api/homework-uploads', method: 'OPTIONS', path: '/api/homework-uploads', expect: everyone(204) },
  {
    route: 'ALL /api/homework-uploads/[id]', method: 'HEAD', path: (_a, ctx) => `/api/homework-uploads/${ctx.uploadId}`, prepare: uploadInProgress, mutates: true,
    raw: () => ({ body: undefined as unknown as string, headers: TUS }),
    expect: { ...ownerOnly(200), handlerA: { status: 200, check: r => expect(r.headers.get('upload-offset')).toBe('1000') } },
  },
  {
    route: 'ALL /api/homework-uploads/[id]', method: 'PATCH', path: (_a, ctx) => `/api/homework-uploads/${ctx.uploadId}`, prepare: uploadInProgress, mutates: true,
    raw: () => ({ body: new Uint8Array(MP4.subarray(1000, 2000)) as unknown as string, contentType: 'application/offset+octet-stream', headers: { ...TUS, 'Upload-Offset': '1000' } }),
    expect: { ...ownerOnly(204), handlerA: { status: 204, check: r => expect(r.headers.get('upload-offset')).toBe('2000') } },
  },
  {
    route: 'ALL /api/homework-uploads/[id]', method: 'DELETE', path: (_a, ctx) => `/api/homework-uploads/${ctx.uploadId}`, prepare: uploadInProgress, mutates: true,
    raw: () => ({ body: undefined as unknown as string, headers: TUS }),
    expect: ownerOnly(204),
  },
  {
    route: 'GET /api/homework-videos/[id]/file', path: (_a, ctx) => `/api/homework-videos/${ctx.videoId}/file`, prepare: video, mutates: true,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.headers.get('content-type')).toBe('video/mp4') } },
  },
]
