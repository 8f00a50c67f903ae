// Homework video uploads: resumable tus uploads (the @tus/server package mounted in Nitro, staging with
// @tus/file-store under UPLOAD_STAGING_DIR), checked on the way in and moved whole into file storage at the end.
//
//   POST   /api/homework-uploads        create (who, which assignment, how big: checked here before tus sees it)
//   HEAD   /api/homework-uploads/<id>   how much has arrived (resuming); only for the person who started it
//   PATCH  /api/homework-uploads/<id>   more bytes; the first bytes must be MP4, MOV or WebM (415 otherwise)
//   DELETE /api/homework-uploads/<id>   give up
//
// The homework_uploads row is the proof of who started an upload: an id without a row (forged, expired, someone
// else's) answers 404. When the last byte arrives the staged file is checked again, its duration read, streamed
// into useFileStorage(), and then in ONE transaction the video row is written and the upload row removed, so nothing
// half-uploaded ever shows as a video. See docs/homework.md "Uploads".
import { createReadStream, createWriteStream } from 'node:fs'
import { open, readdir, rm, stat, unlink } from 'node:fs/promises'
import { randomBytes, randomUUID } from 'node:crypto'
import { resolve } from 'node:path'
import { Readable, Transform } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import type { H3Event } from 'h3'
import { and, eq, gt, inArray, lt } from 'drizzle-orm'
import { FileStore } from '@tus/file-store'
import { Metadata, Server as TusServer, type Upload } from '@tus/server'
import { fileTypeFromBuffer } from 'file-type'
import { parseFile } from 'music-metadata'
import { clients, homeworkAssignments, homeworkUploads, homeworkVideos } from '../database/schema'
import type { AuthUser } from '../utils/authz'
import { acceptedType, contentDisposition, parseByteRange, titleFromFileName, type AcceptedType } from '../../shared/utils/documents'
import { cleanVideoFileName, megabytesToBytes, mp4Duration, notAVideoMessage, VIDEO_SNIFF_BYTES, VIDEO_TYPES, videoTooLargeMessage } from '../../shared/utils/homework-video'
import { HOMEWORK_UPLOAD_POLICY_DEFAULTS, HOMEWORK_UPLOAD_POLICY_KEY, homeworkUploadPolicySchema } from '../../shared/schemas/settings-homework'

export const HOMEWORK_UPLOADS_PATH = '/api/homework-uploads'
/** The response header of the last PATCH (and of a HEAD on a finished upload) naming the new video. */
export const HOMEWORK_VIDEO_ID_HEADER = 'Homework-Video-Id'
const UPLOAD_ID = /^[a-f0-9]{32}$/
const HOUR_MS = 3_600_000

// ---------------------------------------------------------------------------------------------------------------
// Policy and places

export async function homeworkUploadPolicy(db: DbOrTx = useDb()): Promise<{ maxUploadBytes: number, staleUploadHours: number }> {
  const p = await readSetting(HOMEWORK_UPLOAD_POLICY_KEY, homeworkUploadPolicySchema, HOMEWORK_UPLOAD_POLICY_DEFAULTS, db)
  return { maxUploadBytes: megabytesToBytes(p.maxUploadMegabytes), staleUploadHours: p.staleUploadHours }
}

/** UPLOAD_STAGING_DIR (default ./data/uploads-staging): where uploads in progress are kept, never under public/. */
export function uploadStagingDir(): string {
  return resolve(process.cwd(), process.env.UPLOAD_STAGING_DIR || './data/uploads-staging')
}

// ---------------------------------------------------------------------------------------------------------------
// Errors: every refusal is JSON { statusCode, message } with a message for the handler (docs/homework.md "Errors")

interface TusError { status_code: number, body: string }
const STATUS_TEXT: Record<number, string> = {
  400: 'Bad Request', 401: 'Unauthorized', 403: 'Forbidden', 404: 'Not Found', 409: 'Conflict', 410: 'Gone',
  405: 'Method Not Allowed', 412: 'Precondition Failed', 413: 'Content Too Large', 415: 'Unsupported Media Type', 416: 'Range Not Satisfiable', 422: 'Unprocessable Content', 423: 'Locked', 503: 'Service Unavailable',
}
function jsonBody(statusCode: number, message: string): string {
  return JSON.stringify({ statusCode, statusMessage: STATUS_TEXT[statusCode] ?? 'Error', message })
}
/** An error thrown inside tus (store, hooks): tus sends its status and body as they are. */
function tusError(statusCode: number, message: string): TusError {
  return { status_code: statusCode, body: jsonBody(statusCode, message) }
}
/** An error thrown before tus (our own checks): Nitro sends it as JSON { statusCode, statusMessage, message }. */
function refuse(statusCode: number, message: string): never {
  throw createError({ statusCode, statusMessage: STATUS_TEXT[statusCode] ?? 'Error', message })
}

const MESSAGES = {
  notFound: 'No upload was found with that id, or it is not one you started. Choose the video again to send it.',
  expired: 'This upload waited too long without any progress and was removed. Choose the video again to send it.',
  storageDown: 'The video could not be stored just now, and nothing was lost. The upload carries on by itself in a moment; if it stays stopped, press Resume later.',
  diskFull: 'The server has no room for the rest of the video just now, and nothing was lost. The upload carries on by itself when there is room; if it stays stopped, press Resume later.',
  conflict: 'The server has a different amount of this video than the phone expected; the upload continues from the server\'s count.',
  tooManyBytes: 'More bytes arrived than the size this upload was started with. Choose the video again to send it.',
  locked: 'This upload is busy with another request; it continues in a moment.',
  generic: 'The upload could not continue just now, and nothing was lost. It carries on by itself in a moment; if it stays stopped, press Resume later.',
}

/** Tus's own refusals in words for a person, as JSON; our own (already JSON) pass through. Never a 500. */
function humaneTusError(err: { status_code?: number, body?: string, message?: string } | Error): TusError {
  const e = err as { status_code?: number, body?: string, message?: string }
  const status = e.status_code ?? 500
  const body = e.body ?? ''
  if (body.startsWith('{')) return { status_code: status, body }
  if (status >= 500) {
    if (status === 501) return tusError(400, 'Send the video as one upload (parallel or deferred-length uploads are not supported).')
    logFailure('homework-uploads.tus', 'The resumable upload handler failed.', err)
    return tusError(503, MESSAGES.generic)
  }
  const known: Record<number, string> = { 404: MESSAGES.notFound, 409: MESSAGES.conflict, 410: MESSAGES.expired, 413: MESSAGES.tooManyBytes, 423: MESSAGES.locked }
  return tusError(status, known[status] ?? `The upload request was refused: ${body.trim() || 'malformed request'}.`)
}

// ---------------------------------------------------------------------------------------------------------------
// The staging store: @tus/file-store, with the bytes checked as they arrive and disk errors told apart

const DISK_ERRORS = new Set(['ENOSPC', 'EDQUOT', 'EIO', 'EROFS', 'EACCES', 'EPERM', 'EMFILE', 'ENFILE'])

/** The first `n` bytes of a stream, and a stream of all of it (those bytes included), without buffering the rest. */
async function peek(readable: Readable, n: number): Promise<{ head: Buffer, ended: boolean, all: Readable }> {
  const it = readable[Symbol.asyncIterator]()
  const chunks: Buffer[] = []
  let have = 0
  let ended = false
  while (have < n) {
    const next = await it.next()
    if (next.done) { ended = true; break }
    const chunk = Buffer.isBuffer(next.value) ? next.value : Buffer.from(next.value)
    chunks.push(chunk)
    have += chunk.length
  }
  const first = Buffer.concat(chunks)
  async function* rest() {
    if (first.length) yield first
    if (ended) return
    for (;;) {
      const next = await it.next()
      if (next.done) return
      yield next.value as Buffer
    }
  }
  return { head: first.subarray(0, n), ended, all: Readable.from(rest(), { objectMode: false }) }
}

async function readHead(path: string, length: number, position = 0): Promise<Buffer> {
  const fh = await open(path, 'r')
  try {
    const buf = Buffer.alloc(length)
    const { bytesRead } = await fh.read(buf, 0, length, position)
    return buf.subarray(0, bytesRead)
  }
  finally { await fh.close() }
}

/** The accepted video type of these leading bytes; null when they are not one; 'undecided' when too few to tell. */
async function sniffVideo(sample: Buffer, final: boolean): Promise<AcceptedType | null | 'undecided'> {
  const detected = await fileTypeFromBuffer(sample)
  const type = acceptedType(detected?.mime, VIDEO_TYPES)
  if (type) return type
  if (detected || final || sample.length >= VIDEO_SNIFF_BYTES) return null
  return 'undecided'
}

class HomeworkStagingStore extends FileStore {
  /** Uploads being written right now (the cleanup leaves them alone). */
  readonly writing = new Set<string>()

  constructor(directory: string, private readonly onRefused: (id: string) => Promise<void>) {
    super({ directory })
  }

  override async write(readable: Readable, id: string, offset: number): Promise<number> {
    if (!UPLOAD_ID.test(id)) throw tusError(404, MESSAGES.notFound)
    const path = resolve(this.directory, id)
    let source = readable
    this.writing.add(id)
    try {
      if (offset < VIDEO_SNIFF_BYTES) {
        // Judge the bytes, not the name: the start of the file (what is staged already plus this request's first
        // bytes) must be MP4, MOV or WebM.
        const { head, ended, all } = await peek(readable, VIDEO_SNIFF_BYTES - offset)
        const staged = offset > 0 ? await readHead(path, offset) : Buffer.alloc(0)
        const upload = await this.configstore.get(id)
        const final = ended && offset + head.length >= (upload?.size ?? Infinity)
        const verdict = await sniffVideo(Buffer.concat([staged, head]), final)
        if (verdict === null) {
          readable.resume()
          await this.onRefused(id)
          throw tusError(415, notAVideoMessage())
        }
        source = all
      }
      let writeError: NodeJS.ErrnoException | null = null
      const writeable = createWriteStream(path, { flags: 'r+', start: offset })
      writeable.on('error', (e) => { writeError = e })
      let received = 0
      const count = new Transform({ transform(chunk, _enc, done) { received += chunk.length; done(null, chunk) } })
      try {
        await pipeline(source, count, writeable)
      }
      catch (err) {
        const code = (writeError as NodeJS.ErrnoException | null)?.code ?? (err as NodeJS.ErrnoException).code
        if (writeError || (code && DISK_ERRORS.has(code))) {
          logFailure('homework-uploads.staging-write', `Staging write of ${id} failed (${code}); the bytes before it are kept.`, err)
          throw tusError(503, code === 'ENOSPC' || code === 'EDQUOT' ? MESSAGES.diskFull : MESSAGES.storageDown)
        }
        throw err
      }
      return offset + received
    }
    finally {
      this.writing.delete(id)
    }
  }
}

// ---------------------------------------------------------------------------------------------------------------
// The tus server (one per process)

interface CreationContext { id: string, user: AuthUser, assignmentId: string, clientId: string, fileName: string, size: number, staleHours: number }
const creations = new WeakMap<object, CreationContext>()

let tus: TusServer | undefined
let store: HomeworkStagingStore | undefined

function nodeRequestOf(req: unknown): object | undefined {
  const r = req as { runtime?: { node?: { req?: object } }, node?: { req?: object } }
  return r.runtime?.node?.req ?? r.node?.req
}

export function useHomeworkTus(): { tus: TusServer, store: HomeworkStagingStore } {
  if (!tus || !store) {
    store = new HomeworkStagingStore(uploadStagingDir(), discardUpload)
    tus = new TusServer({
      path: HOMEWORK_UPLOADS_PATH,
      datastore: store,
      // A relative Location (/api/homework-uploads/<id>): right behind any proxy, and the same URL after a reload.
      relativeLocation: true,
      // Same origin only: our own page sends these requests (server/middleware/0.origin.ts refuses other sites).
      allowedOrigins: () => false,
      exposedHeaders: [HOMEWORK_VIDEO_ID_HEADER],
      namingFunction: (req) => {
        const ctx = creations.get(nodeRequestOf(req) ?? {})
        if (!ctx) throw tusError(400, 'Start the upload from the homework page.')
        return ctx.id
      },
      onUploadCreate: async (req, upload) => {
        const ctx = creations.get(nodeRequestOf(req) ?? {})
        if (!ctx || ctx.id !== upload.id) throw tusError(400, 'Start the upload from the homework page.')
        try {
          await useDb().insert(homeworkUploads).values({
            id: ctx.id, assignmentId: ctx.assignmentId, clientId: ctx.clientId, uploadedById: ctx.user.id,
            fileName: ctx.fileName, declaredSize: ctx.size, expiresAt: new Date(Date.now() + ctx.staleHours * HOUR_MS),
          })
        }
        catch (err) {
          logFailure('homework-uploads.record', 'Recording a new upload failed.', err)
          throw tusError(503, MESSAGES.generic)
        }
        return {}
      },
      onUploadFinish: async (_req, upload) => {
        const { videoId } = await finishHomeworkUpload(upload.id)
        return { headers: { [HOMEWORK_VIDEO_ID_HEADER]: videoId } }
      },
      onResponseError: (_req, err) => humaneTusError(err),
    })
  }
  return { tus, store }
}

// ---------------------------------------------------------------------------------------------------------------
// Finishing: the staged file, checked, into file storage; then the video row in one transaction

const finishing = new Map<string, Promise<{ videoId: string }>>()
/** Uploads finished lately, so a retried last request (its answer lost) still learns its video (in-process). */
const finished = new Map<string, { videoId: string, userId: string, size: number, at: number }>()

function rememberFinished(id: string, entry: { videoId: string, userId: string, size: number }) {
  finished.set(id, { ...entry, at: Date.now() })
  for (const [k, v] of finished) if (Date.now() - v.at > 6 * HOUR_MS) finished.delete(k)
}

/** Removes an upload: its staged bytes and its row (refused, expired, given up). */
async function discardUpload(id: string): Promise<void> {
  const { store } = useHomeworkTus()
  await store.remove(id).catch(() => { /* already gone */ })
  await rm(resolve(uploadStagingDir(), id), { force: true }).catch(() => {})
  await rm(resolve(uploadStagingDir(), `${id}.json`), { force: true }).catch(() => {})
  await useDb().delete(homeworkUploads).where(eq(homeworkUploads.id, id))
}

/** The duration in seconds, from the container; null when it cannot be read (the video is kept anyway). */
async function readDuration(path: string, size: number, type: AcceptedType): Promise<number | null> {
  try {
    const meta = await parseFile(path, { duration: true, skipCovers: true })
    const d = meta.format.duration
    if (typeof d === 'number' && Number.isFinite(d) && d > 0) return d
  }
  catch { /* fall through: not readable by the metadata library */ }
  if (type.mime === 'video/mp4' || type.mime === 'video/quicktime') {
    try {
      const fh = await open(path, 'r')
      try {
        return await mp4Duration(async (offset, length) => {
          const buf = Buffer.alloc(length)
          const { bytesRead } = await fh.read(buf, 0, length, offset)
          return buf.subarray(0, bytesRead)
        }, size)
      }
      finally { await fh.close() }
    }
    catch { return null }
  }
  return null
}

/**
 * Turns a complete staged upload into a video. Safe to call twice at once (the second waits for the first) and
 * again after a failure (the staged file and the row stay until the video row is written).
 */
export function finishHomeworkUpload(id: string): Promise<{ videoId: string }> {
  const running = finishing.get(id)
  if (running) return running
  const job = doFinish(id).finally(() => finishing.delete(id))
  finishing.set(id, job)
  return job
}

async function doFinish(id: string): Promise<{ videoId: string }> {
  const done = finished.get(id)
  if (done) return { videoId: done.videoId }
  const [row] = await useDb().select().from(homeworkUploads).where(eq(homeworkUploads.id, id)).limit(1)
  if (!row) throw tusError(404, MESSAGES.notFound)
  const path = resolve(uploadStagingDir(), id)
  const size = (await stat(path).catch(() => null))?.size
  if (size === undefined) { await discardUpload(id); throw tusError(410, MESSAGES.expired) }
  if (size !== row.declaredSize) throw tusError(409, MESSAGES.conflict)

  // Check the whole file's start once more (a very short first request may have left the type undecided).
  const type = await sniffVideo(await readHead(path, VIDEO_SNIFF_BYTES), true)
  if (!type || type === 'undecided') {
    await discardUpload(id)
    throw tusError(415, notAVideoMessage())
  }
  const durationSeconds = await readDuration(path, size, type)

  const videoId = randomUUID()
  const storageKey = `homework/${row.clientId}/${videoId}.${type.ext}`
  const storage = useFileStorage()
  try {
    await storage.put(storageKey, createReadStream(path), { contentType: type.mime })
  }
  catch (err) {
    logFailure('homework-uploads.store', `Storing the finished upload ${id} failed; it stays staged for a retry.`, err)
    await storage.delete(storageKey).catch(() => {})
    throw tusError(503, MESSAGES.storageDown)
  }
  let claimed = false
  try {
    await useDb().transaction(async (tx) => {
      // Claim the upload: if another request (or instance) finished it first, this one writes nothing.
      const gone = await tx.delete(homeworkUploads).where(eq(homeworkUploads.id, id)).returning({ id: homeworkUploads.id })
      if (!gone.length) return
      claimed = true
      await tx.insert(homeworkVideos).values({
        id: videoId, assignmentId: row.assignmentId, clientId: row.clientId, uploadedById: row.uploadedById,
        fileName: row.fileName, contentType: type.mime, size, storageKey, durationSeconds,
      })
      await logAudit(tx, {
        actorId: row.uploadedById, action: 'homework.video_uploaded', entityType: 'homework_video', entityId: videoId, clientId: row.clientId,
        data: { assignmentId: row.assignmentId, fileName: row.fileName, contentType: type.mime, size, durationSeconds },
      })
    })
  }
  catch (err) {
    logFailure('homework-uploads.record-video', `Recording the video of upload ${id} failed; it stays staged for a retry.`, err)
    await storage.delete(storageKey).catch(() => {})
    throw tusError(503, MESSAGES.storageDown)
  }
  if (!claimed) {
    await storage.delete(storageKey).catch(() => {})
    const other = finished.get(id)
    if (other) return { videoId: other.videoId }
    throw tusError(404, MESSAGES.notFound)
  }
  rememberFinished(id, { videoId, userId: row.uploadedById, size })
  await useHomeworkTus().store.remove(id).catch((err) => {
    logFailure('homework-uploads.remove-staged', `The staged file of finished upload ${id} could not be removed (the cleanup will).`, err, 'warn')
  })
  return { videoId }
}

// ---------------------------------------------------------------------------------------------------------------
// The route: our checks, then tus

function tusHeaders(extra: Record<string, string> = {}): Record<string, string> {
  return { 'Tus-Resumable': '1.0.0', 'Cache-Control': 'no-store', ...extra }
}

async function requireUploadAssignment(user: AuthUser, assignmentId: string) {
  const [row] = await useDb().select({ assignment: homeworkAssignments }).from(homeworkAssignments)
    .innerJoin(clients, eq(clients.id, homeworkAssignments.clientId))
    .where(and(eq(homeworkAssignments.id, assignmentId), clientScope(user))).limit(1)
  if (!row) refuse(404, 'No homework was found with that id, or it is not for your household. Open the homework again from your home page.')
  if (row.assignment.state !== 'open') {
    refuse(422, row.assignment.state === 'done'
      ? 'This homework is already marked done, so no more videos can be sent for it. Ask your trainer if you want to send another.'
      : 'This homework was cancelled by your trainer, so no videos can be sent for it.')
  }
  return row.assignment
}

async function handleCreate(event: H3Event, user: AuthUser) {
  if (user.role === 'trainer') refuse(403, 'Homework videos are sent by the household\'s handlers. Ask the handler to send the video from their phone.')
  if (getRequestHeader(event, 'upload-concat')) refuse(400, 'Send the video as one upload (parallel uploads are not supported).')
  let metadata: Record<string, string | null> = {}
  try { metadata = Metadata.parse(getRequestHeader(event, 'upload-metadata') ?? undefined) as Record<string, string | null> }
  catch { refuse(400, 'The upload\'s details (Upload-Metadata) could not be read. Choose the video again to send it.') }
  const assignmentId = metadata.assignmentId?.trim()
  if (!assignmentId) refuse(400, 'Say which homework the video is for (metadata "assignmentId").')
  if (!metadata.filename?.trim()) refuse(400, 'Give the video\'s file name (metadata "filename").')
  const lengthHeader = getRequestHeader(event, 'upload-length')
  if (lengthHeader === undefined || getRequestHeader(event, 'upload-defer-length') !== undefined) {
    refuse(400, 'Say how big the video is (Upload-Length); uploads of unknown length are not accepted.')
  }
  if (!/^\d{1,16}$/.test(lengthHeader!)) refuse(400, 'The video\'s size (Upload-Length) must be a whole number of bytes.')
  const size = Number(lengthHeader)
  if (size === 0) refuse(400, 'This file is empty. Choose the video again from the phone\'s camera roll.')
  const policy = await homeworkUploadPolicy()
  if (size > policy.maxUploadBytes) refuse(413, videoTooLargeMessage(size, policy.maxUploadBytes))
  const assignment = await requireUploadAssignment(user, assignmentId!)

  const id = randomBytes(16).toString('hex')
  const ctx: CreationContext = { id, user, assignmentId: assignment.id, clientId: assignment.clientId, fileName: cleanVideoFileName(metadata.filename), size, staleHours: policy.staleUploadHours }
  creations.set(event.node.req, ctx)
  const { tus } = useHomeworkTus()
  await tus.handle(event.node.req, event.node.res)
  // Created (201) or refused: a refused creation leaves no row and no staged bytes behind.
  const status = event.node.res.statusCode
  if (status !== 201 && status !== 204) await discardUpload(id)
}

/**
 * The upload row for this id if this person started it and still belongs to the household (a handler removed
 * from it loses their uploads in progress too), with its assignment's state; null otherwise.
 */
async function requireOwnUpload(user: AuthUser, id: string) {
  if (!UPLOAD_ID.test(id)) refuse(404, MESSAGES.notFound)
  const [row] = await useDb().select({ upload: homeworkUploads, assignmentState: homeworkAssignments.state }).from(homeworkUploads)
    .innerJoin(clients, eq(clients.id, homeworkUploads.clientId))
    .innerJoin(homeworkAssignments, eq(homeworkAssignments.id, homeworkUploads.assignmentId))
    .where(and(eq(homeworkUploads.id, id), eq(homeworkUploads.uploadedById, user.id), clientScope(user))).limit(1)
  return row ?? null
}

async function handleExisting(event: H3Event, user: AuthUser, id: string) {
  const method = event.method
  const found = await requireOwnUpload(user, id)
  const row = found?.upload
  if (!row) {
    // Finished a moment ago, its last answer lost: tell the same person it is complete.
    const done = finished.get(id)
    if (done && done.userId === user.id && method === 'HEAD') {
      setResponseHeaders(event, tusHeaders({ 'Upload-Offset': String(done.size), 'Upload-Length': String(done.size), [HOMEWORK_VIDEO_ID_HEADER]: done.videoId }))
      setResponseStatus(event, 200)
      return ''
    }
    refuse(404, MESSAGES.notFound)
  }
  if (row.expiresAt.getTime() < Date.now()) {
    await discardUpload(id)
    refuse(410, MESSAGES.expired)
  }
  if (method !== 'DELETE' && found!.assignmentState !== 'open') {
    // Marked done or cancelled while the video was on its way: it cannot be handed in any more.
    await discardUpload(id)
    refuse(422, found!.assignmentState === 'done'
      ? 'This homework was marked done while the video was being sent, so it cannot be handed in any more. Ask your trainer if you want to send it anyway.'
      : 'This homework was cancelled by your trainer while the video was being sent, so it cannot be handed in.')
  }
  const { tus, store } = useHomeworkTus()
  if (method === 'HEAD') {
    // All bytes staged but not yet a video (storage was down at the end): finish now, then say it is complete.
    const upload = await store.getUpload(id).catch(() => null) as Upload | null
    if (!upload) {
      await discardUpload(id)
      refuse(410, MESSAGES.expired)
    }
    if (upload!.size !== undefined && upload!.offset === upload!.size) {
      try {
        const { videoId } = await finishHomeworkUpload(id)
        setResponseHeaders(event, tusHeaders({ 'Upload-Offset': String(upload!.size), 'Upload-Length': String(upload!.size), [HOMEWORK_VIDEO_ID_HEADER]: videoId }))
        setResponseStatus(event, 200)
        return ''
      }
      catch (err) {
        const e = humaneTusError(err as TusError)
        setResponseHeaders(event, tusHeaders({ 'Content-Type': 'application/json' }))
        setResponseStatus(event, e.status_code)
        return e.body
      }
    }
  }
  if (method === 'PATCH') {
    // Progress keeps an upload alive: it expires a policy's hours after its last request.
    const { staleUploadHours } = await homeworkUploadPolicy()
    await useDb().update(homeworkUploads).set({ expiresAt: new Date(Date.now() + staleUploadHours * HOUR_MS) }).where(eq(homeworkUploads.id, id))
  }
  // Giving up: the row goes first (the answer must not come before it), then tus removes the staged bytes (a file
  // it could not remove is an orphan the cleanup takes).
  if (method === 'DELETE') await useDb().delete(homeworkUploads).where(eq(homeworkUploads.id, id))
  await tus.handle(event.node.req, event.node.res)
}

/** The Nitro handler of /api/homework-uploads and /api/homework-uploads/<id>. */
export async function handleHomeworkUploadRequest(event: H3Event, id?: string) {
  const method = event.method
  if (method === 'OPTIONS') {
    setResponseHeaders(event, { 'Tus-Resumable': '1.0.0', 'Tus-Version': '1.0.0', 'Tus-Extension': 'creation,creation-with-upload,termination', 'Allow': id ? 'OPTIONS, HEAD, PATCH, DELETE' : 'OPTIONS, POST' })
    setResponseStatus(event, 204)
    return ''
  }
  const allowed = id ? ['HEAD', 'PATCH', 'DELETE'] : ['POST']
  if (!allowed.includes(method)) {
    setResponseHeader(event, 'Allow', ['OPTIONS', ...allowed].join(', '))
    refuse(405, `Use ${allowed.join(', ')} here (the tus upload protocol).`)
  }
  const user = requireUser(event)
  if (!getRequestHeader(event, 'tus-resumable')) refuse(412, 'Send the upload with a tus client (the Tus-Resumable header is missing).')
  if (id === undefined) return handleCreate(event, user)
  return handleExisting(event, user, id)
}

// ---------------------------------------------------------------------------------------------------------------
// For the review pages, and the cleanup

export interface HomeworkUploadInProgress { id: string, fileName: string, declaredSize: number, offset: number, uploadedById: string, updatedAt: Date }

/** Uploads started but not finished, per assignment (never shown as submissions; an "is sending…" hint at most). */
export async function homeworkUploadsInProgress(assignmentIds: string[]): Promise<Map<string, HomeworkUploadInProgress[]>> {
  const out = new Map<string, HomeworkUploadInProgress[]>()
  if (!assignmentIds.length) return out
  const rows = await useDb().select().from(homeworkUploads)
    .where(and(inArray(homeworkUploads.assignmentId, assignmentIds), gt(homeworkUploads.expiresAt, new Date())))
  for (const r of rows) {
    const offset = (await stat(resolve(uploadStagingDir(), r.id)).catch(() => null))?.size ?? 0
    const list = out.get(r.assignmentId) ?? []
    list.push({ id: r.id, fileName: r.fileName, declaredSize: r.declaredSize, offset, uploadedById: r.uploadedById, updatedAt: r.updatedAt })
    out.set(r.assignmentId, list)
  }
  return out
}

/**
 * Removes expired uploads (rows whose hours without progress have passed, with their staged bytes) and staged
 * files that have no row (left by a crash between tus creating them and the row being written, or by a row removed
 * with its assignment). Uploads being written right now are left alone. Returns how many uploads were removed.
 */
export async function cleanUpHomeworkUploads(now = new Date()): Promise<number> {
  const { store } = useHomeworkTus()
  let removed = 0
  const expired = await useDb().select({ id: homeworkUploads.id }).from(homeworkUploads).where(lt(homeworkUploads.expiresAt, now))
  for (const { id } of expired) {
    if (store.writing.has(id) || finishing.has(id)) continue
    await discardUpload(id)
    removed++
  }
  const dir = uploadStagingDir()
  const names = await readdir(dir).catch(() => [] as string[])
  const ids = [...new Set(names.map(n => n.replace(/\.json$/, '')).filter(n => UPLOAD_ID.test(n)))]
  if (!ids.length) return removed
  const known = new Set((await useDb().select({ id: homeworkUploads.id }).from(homeworkUploads).where(inArray(homeworkUploads.id, ids))).map(r => r.id))
  const { staleUploadHours } = await homeworkUploadPolicy()
  for (const id of ids) {
    if (known.has(id) || store.writing.has(id) || finishing.has(id)) continue
    const mtime = (await stat(resolve(dir, id)).catch(() => null))?.mtimeMs ?? (await stat(resolve(dir, `${id}.json`)).catch(() => null))?.mtimeMs ?? 0
    // A file without a row is only an orphan once it is older than a creation takes (a few minutes; our own choice).
    if (now.getTime() - mtime < Math.min(staleUploadHours * HOUR_MS, 10 * 60_000)) continue
    await unlink(resolve(dir, id)).catch(() => {})
    await unlink(resolve(dir, `${id}.json`)).catch(() => {})
    removed++
  }
  return removed
}

// ---------------------------------------------------------------------------------------------------------------
// Serving a video: only through GET /api/homework-videos/<id>/file, with HTTP Range so it seeks and plays on iOS

/** The video row if the user may see its household (its handlers, its trainer, the office); else 404. */
async function requireVideoFileAccess(event: H3Event, videoId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ video: homeworkVideos }).from(homeworkVideos)
    .innerJoin(clients, eq(clients.id, homeworkVideos.clientId))
    .where(and(eq(homeworkVideos.id, videoId), clientScope(user))).limit(1)
  if (!row) notFound('homework video')
  return row.video
}

/**
 * Sends a homework video: its type from the row, inline, nosniff, not cached, one byte range (206 with
 * Content-Range; 416 past the end). The same for both storage backends.
 */
export async function sendHomeworkVideoFile(event: H3Event, videoId: string) {
  const video = await requireVideoFileAccess(event, videoId)
  const storage = useFileStorage()
  let stored
  try { stored = await storage.stat(video.storageKey) }
  catch (err) {
    logFailure('homework-videos.storage', `File storage could not be reached for ${video.storageKey}.`, err)
    refuse(503, 'The video cannot be fetched from storage just now. Please try again in a moment.')
  }
  if (!stored) refuse(404, 'The file of this video is missing from storage. Ask the handler to send it again.')
  const range = parseByteRange(getRequestHeader(event, 'range'), stored.size)
  if (range === 'unsatisfiable') {
    setResponseHeader(event, 'Content-Range', `bytes */${stored.size}`)
    refuse(416, 'The requested part of the video lies past its end.')
  }
  const type = acceptedType(video.contentType, VIDEO_TYPES)
  setResponseHeaders(event, {
    'Content-Type': video.contentType,
    'Content-Disposition': contentDisposition('inline', titleFromFileName(video.fileName), type?.ext ?? 'bin'),
    'X-Content-Type-Options': 'nosniff',
    'Cache-Control': 'private, no-store',
    'Accept-Ranges': 'bytes',
  })
  let object
  try { object = await storage.get(video.storageKey, range ?? undefined) }
  catch (err) {
    logFailure('homework-videos.read', `Reading ${video.storageKey} failed.`, err)
    refuse(503, 'The video cannot be fetched from storage just now. Please try again in a moment.')
  }
  if (!object) refuse(404, 'The file of this video is missing from storage. Ask the handler to send it again.')
  if (range) {
    setResponseStatus(event, 206)
    setResponseHeader(event, 'Content-Range', `bytes ${range.start}-${range.end}/${stored.size}`)
  }
  setResponseHeader(event, 'Content-Length', range ? range.end - range.start + 1 : stored.size)
  if (event.method === 'HEAD') { object.stream.destroy(); return null }
  // A player that seeks drops the connection: release the storage stream (an S3 socket) at once.
  event.node.res.once('close', () => object.stream.destroy())
  return sendStream(event, object.stream)
}
