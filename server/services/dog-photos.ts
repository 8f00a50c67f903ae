// The dog's photo: one per dog, scoped through the dog's client (clientScope), replaced whole.
import type { H3Event } from 'h3'
import { and, eq } from 'drizzle-orm'
import { clients, dogPhotos, dogs } from '../database/schema'
import type { AuthUser } from '../utils/authz'
import type { DogPhotoInfo } from '../../shared/types/documents'
import { acceptedType, contentDisposition, DOG_PHOTO_TYPES } from '../../shared/utils/documents'

function dogNotFound(): never {
  throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'No dog was found with that id, or it is not one you can open.' })
}

/** The dog if the user may see its client file, else 404; with `write`, handlers get 403. */
export async function requireDogForPhoto(event: H3Event, dogId: string, opts: { write?: boolean } = {}) {
  const user = requireUser(event)
  const [dog] = await useDb().select({ id: dogs.id, clientId: dogs.clientId, name: dogs.name }).from(dogs)
    .innerJoin(clients, eq(clients.id, dogs.clientId))
    .where(and(eq(dogs.id, dogId), clientScope(user))).limit(1)
  if (!dog) dogNotFound()
  if (opts.write && user.role === 'handler') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer or the office can change the dog\'s photo. Send a new photo to your trainer.' })
  }
  return { user, dog }
}

/**
 * Stores the new photo under a fresh key, points the dog at it, then removes the old file. A failure before the
 * row changes removes the new file again, so nothing half-done stays behind.
 */
export async function replaceDogPhoto(user: AuthUser, dog: { id: string, clientId: string }, bytes: Buffer, contentType: string): Promise<DogPhotoInfo> {
  const storage = useFileStorage()
  const storageKey = `dogs/${dog.id}/photo-${crypto.randomUUID()}`
  let oldKey: string | undefined
  let saved: typeof dogPhotos.$inferSelect
  try {
    await storage.put(storageKey, bytes, { contentType })
    saved = await useDb().transaction(async (tx) => {
      const [old] = await tx.select({ storageKey: dogPhotos.storageKey }).from(dogPhotos).where(eq(dogPhotos.dogId, dog.id))
      oldKey = old?.storageKey
      const values = { storageKey, contentType, sizeBytes: bytes.length, updatedAt: new Date() }
      const [row] = await tx.insert(dogPhotos).values({ dogId: dog.id, ...values })
        .onConflictDoUpdate({ target: dogPhotos.dogId, set: values }).returning()
      await logAudit(tx, { actorId: user.id, action: old ? 'dog.photo.replaced' : 'dog.photo.added', entityType: 'dog', entityId: dog.id, clientId: dog.clientId, data: { contentType, sizeBytes: bytes.length } })
      return row!
    })
  }
  catch (err) {
    await storage.delete(storageKey).catch(() => {})
    throw uploadSaveFailed(err, 'photo')
  }
  if (oldKey && oldKey !== storageKey) {
    await storage.delete(oldKey).catch(err => logFailure('dog-photos.remove-old', `The old photo ${oldKey} could not be removed.`, err, 'warn'))
  }
  return { dogId: saved.dogId, contentType: saved.contentType, sizeBytes: saved.sizeBytes, updatedAt: saved.updatedAt }
}

/** Sends the photo (inline, revalidated on each view by its ETag), or 404 when the dog has none. */
export async function sendDogPhoto(event: H3Event, dog: { id: string, name: string }) {
  const [photo] = await useDb().select().from(dogPhotos).where(eq(dogPhotos.dogId, dog.id))
  const object = photo ? await useFileStorage().get(photo.storageKey) : null
  if (!photo || !object) {
    throw createError({ statusCode: 404, statusMessage: 'Not Found', message: `There is no photo of ${dog.name} yet.` })
  }
  const etag = `"${photo.storageKey.split('/').pop()}"`
  setResponseHeaders(event, {
    'Content-Type': photo.contentType,
    'Content-Disposition': contentDisposition('inline', dog.name, acceptedType(photo.contentType, DOG_PHOTO_TYPES)?.ext ?? 'bin'),
    'X-Content-Type-Options': 'nosniff',
    'Cache-Control': 'private, no-cache',
    'ETag': etag,
  })
  if (getRequestHeader(event, 'if-none-match') === etag) {
    object.stream.destroy()
    setResponseStatus(event, 304)
    return null
  }
  setResponseHeader(event, 'Content-Length', object.size)
  return sendStream(event, object.stream)
}
