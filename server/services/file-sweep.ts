// The orphan-file sweep: a file in storage that no row points to is what a crash between writing a file and
// recording it leaves behind (a document, a dog photo or a homework video), and a half-written temporary file is
// what a crash during the write leaves. The sweep compares storage with the database and removes both, once they
// are older than any upload takes to be recorded. It only ever looks under the prefixes listed here, so files of a
// feature it does not know are never touched.
import { documents, dogPhotos, homeworkVideos } from '../database/schema'

// An upload is written and then recorded within seconds; an hour is far past that (our own choice, common practice).
export const ORPHAN_GRACE_MS = 60 * 60 * 1000

// Where each kind of file lives (server/services/documents.ts, dog-photos.ts, homework-uploads.ts and the seed).
export const SWEPT_PREFIXES = ['clients/', 'dogs/', 'homework/', 'homework-videos/'] as const

export interface SweepResult { orphans: number, temporary: number, kept: number }

export async function sweepOrphanFiles(now = new Date()): Promise<SweepResult> {
  const storage = useFileStorage()
  const db = useDb()
  const cutoff = now.getTime() - ORPHAN_GRACE_MS
  const result: SweepResult = { orphans: 0, temporary: 0, kept: 0 }
  for (const prefix of SWEPT_PREFIXES) {
    const old: string[] = []
    for await (const f of storage.list(prefix)) {
      if (f.modifiedAt.getTime() < cutoff) old.push(f.key)
    }
    if (!old.length) continue
    // Read the rows after listing: a file recorded meanwhile is then known.
    const known = new Set<string>([
      ...(await db.select({ k: documents.storageKey }).from(documents)).map(r => r.k),
      ...(await db.select({ k: dogPhotos.storageKey }).from(dogPhotos)).map(r => r.k),
      ...(await db.select({ k: homeworkVideos.storageKey }).from(homeworkVideos)).map(r => r.k),
    ])
    for (const key of old) {
      if (known.has(key)) { result.kept++; continue }
      await storage.delete(key)
      result.orphans++
      logEvent('files.orphan-removed', { key })
    }
  }
  for await (const t of storage.listTemporary()) {
    if (t.modifiedAt.getTime() >= cutoff) continue
    await t.remove()
    result.temporary++
    logEvent('files.temporary-removed', { name: t.name })
  }
  return result
}
