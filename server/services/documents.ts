// Documents on a client file: list, upload, download, rename, delete. Every read and write is scoped through the
// client the document belongs to (clientScope), so another household's document answers 404 like a missing one.
import type { H3Event } from 'h3'
import { and, desc, eq } from 'drizzle-orm'
import { clients, documents, users } from '../database/schema'
import type { AuthUser } from '../utils/authz'
import type { ClientDocument } from '../../shared/types/documents'
import type { DocumentPatchInput, DocumentUploadInput } from '../../shared/schemas/documents'
import { acceptedType, contentDisposition, DOCUMENT_TYPES, parseByteRange, titleFromFileName } from '../../shared/utils/documents'

type DocumentRecord = typeof documents.$inferSelect

const documentColumns = {
  id: documents.id, clientId: documents.clientId, kind: documents.kind, title: documents.title,
  originalName: documents.originalName, contentType: documents.contentType, sizeBytes: documents.sizeBytes,
  createdAt: documents.createdAt, updatedAt: documents.updatedAt,
  uploadedById: documents.uploadedById, uploadedByName: users.name,
}

function toClientDocument(row: { uploadedById: string | null, uploadedByName: string | null } & Omit<ClientDocument, 'uploadedBy'>): ClientDocument {
  const { uploadedById, uploadedByName, ...rest } = row
  return { ...rest, uploadedBy: uploadedById ? { id: uploadedById, name: uploadedByName ?? 'A former user' } : null }
}

export function documentNotFound(): never {
  throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'No document was found with that id, or it is not one you can open.' })
}

export async function listClientDocuments(clientId: string): Promise<ClientDocument[]> {
  const rows = await useDb().select(documentColumns).from(documents)
    .leftJoin(users, eq(users.id, documents.uploadedById))
    .where(eq(documents.clientId, clientId))
    .orderBy(desc(documents.createdAt), desc(documents.id))
  return rows.map(toClientDocument)
}

async function loadClientDocument(id: string): Promise<ClientDocument> {
  const [row] = await useDb().select(documentColumns).from(documents).leftJoin(users, eq(users.id, documents.uploadedById)).where(eq(documents.id, id))
  if (!row) documentNotFound()
  return toClientDocument(row)
}

/**
 * The document with this id if the user may see its client file, else 404. With `write`, handlers get 403
 * (they may upload to their own file but not rename or delete).
 */
export async function requireDocumentAccess(event: H3Event, id: string, opts: { write?: boolean } = {}): Promise<{ user: AuthUser, document: DocumentRecord }> {
  const user = requireUser(event)
  const [row] = await useDb().select({ document: documents }).from(documents)
    .innerJoin(clients, eq(clients.id, documents.clientId))
    .where(and(eq(documents.id, id), clientScope(user))).limit(1)
  if (!row) documentNotFound()
  if (opts.write && user.role === 'handler') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer or the office can rename or delete a document. Ask your trainer if one needs changing.' })
  }
  return { user, document: row.document }
}

/**
 * Stores the uploaded file, then records it. The file is written under a fresh key before the row exists; if
 * recording fails, the file is removed again, so a refused or failed upload leaves nothing behind.
 */
export async function createClientDocument(user: AuthUser, clientId: string, file: { name: string, bytes: Buffer }, contentType: string, input: DocumentUploadInput): Promise<ClientDocument> {
  const id = crypto.randomUUID()
  const storageKey = `clients/${clientId}/documents/${id}`
  const storage = useFileStorage()
  const title = input.title ?? titleFromFileName(file.name)
  try {
    await storage.put(storageKey, file.bytes, { contentType })
    await useDb().transaction(async (tx) => {
      await tx.insert(documents).values({
        id, clientId, kind: input.kind, title, originalName: file.name.slice(0, 255), contentType,
        sizeBytes: file.bytes.length, storageKey, uploadedById: user.id,
      })
      await logAudit(tx, { actorId: user.id, action: 'document.created', entityType: 'document', entityId: id, clientId, data: { title, kind: input.kind, contentType, sizeBytes: file.bytes.length } })
    })
  }
  catch (err) {
    await storage.delete(storageKey).catch(() => {})
    throw uploadSaveFailed(err, 'document')
  }
  return loadClientDocument(id)
}

export async function updateClientDocument(user: AuthUser, document: DocumentRecord, input: DocumentPatchInput): Promise<ClientDocument> {
  await useDb().transaction(async (tx) => {
    await tx.update(documents).set({ ...(input.title !== undefined ? { title: input.title } : {}), ...(input.kind ? { kind: input.kind } : {}) })
      .where(eq(documents.id, document.id))
    await logAudit(tx, {
      actorId: user.id, action: 'document.updated', entityType: 'document', entityId: document.id, clientId: document.clientId,
      data: { from: { title: document.title, kind: document.kind }, to: { title: input.title ?? document.title, kind: input.kind ?? document.kind } },
    })
  })
  return loadClientDocument(document.id)
}

/** Deletes the row (with its audit entry) and then the file; a file left by a crash in between is harmless. */
export async function deleteClientDocument(user: AuthUser, document: DocumentRecord): Promise<ClientDocument> {
  const before = await loadClientDocument(document.id)
  await useDb().transaction(async (tx) => {
    await tx.delete(documents).where(eq(documents.id, document.id))
    await logAudit(tx, { actorId: user.id, action: 'document.deleted', entityType: 'document', entityId: document.id, clientId: document.clientId, data: { title: document.title, kind: document.kind, originalName: document.originalName } })
  })
  await useFileStorage().delete(document.storageKey).catch((err) => {
    logFailure('documents.remove-file', `The file ${document.storageKey} of a deleted document could not be removed.`, err, 'warn')
  })
  return before
}

/**
 * Sends a stored file through this authorized route: its own Content-Type, an attachment (or, when asked and the
 * type allows it, inline) Content-Disposition with an RFC 5987 file name, nosniff, no caching, and one byte range.
 */
export async function sendStoredFile(event: H3Event, file: { storageKey: string, contentType: string, title: string }, opts: { inline?: boolean } = {}) {
  const storage = useFileStorage()
  const stored = await storage.stat(file.storageKey)
  if (!stored) {
    throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'The file of this document is missing from storage. Ask the trainer to upload it again.' })
  }
  const range = parseByteRange(getRequestHeader(event, 'range'), stored.size)
  if (range === 'unsatisfiable') {
    setResponseHeader(event, 'Content-Range', `bytes */${stored.size}`)
    throw createError({ statusCode: 416, statusMessage: 'Range Not Satisfiable', message: 'The requested part of the file lies past its end.' })
  }
  const type = acceptedType(file.contentType, DOCUMENT_TYPES)
  setResponseHeaders(event, {
    'Content-Type': file.contentType,
    'Content-Disposition': contentDisposition(opts.inline && type?.inline ? 'inline' : 'attachment', file.title, type?.ext ?? 'bin'),
    'X-Content-Type-Options': 'nosniff',
    'Cache-Control': 'private, no-store',
    'Accept-Ranges': 'bytes',
  })
  const object = await storage.get(file.storageKey, range ?? undefined)
  if (!object) documentNotFound()
  if (range) {
    setResponseStatus(event, 206)
    setResponseHeader(event, 'Content-Range', `bytes ${range.start}-${range.end}/${stored.size}`)
  }
  setResponseHeader(event, 'Content-Length', range ? range.end - range.start + 1 : stored.size)
  return sendStream(event, object.stream)
}
