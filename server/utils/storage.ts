// File storage: one interface for the whole app, addressed by keys (like an object store), never by paths.
// The local-disk backend keeps files under FILES_DIR; an S3-compatible backend can be added behind the same
// interface later (put ~ PutObject, get with a range ~ GetObject with Range, stat ~ HeadObject, delete ~ DeleteObject).
import { createReadStream, createWriteStream } from 'node:fs'
import { mkdir, open, rename, rm, stat, writeFile } from 'node:fs/promises'
import { dirname, relative, resolve, sep, isAbsolute } from 'node:path'
import { randomBytes } from 'node:crypto'
import { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'

export interface FileStorageRange { start: number, end: number }

export interface FileStorageInfo {
  key: string
  /** The whole object's size in bytes. */
  size: number
  modifiedAt: Date
}

export interface FileStorageObject extends FileStorageInfo {
  /** The bytes: the whole object, or only the requested range (inclusive). */
  stream: Readable
  range: FileStorageRange | null
}

export interface FileStorage {
  /** Writes the object whole or not at all: readers never see a half-written file. Replaces an existing key. */
  put(key: string, data: Buffer | Uint8Array | Readable, opts: { contentType: string }): Promise<FileStorageInfo>
  /** The object's bytes, or null when there is no such key. The range is inclusive and must lie inside the object. */
  get(key: string, range?: FileStorageRange): Promise<FileStorageObject | null>
  stat(key: string): Promise<FileStorageInfo | null>
  /** Removes the object; removing a key that does not exist is not an error. */
  delete(key: string): Promise<void>
  exists(key: string): Promise<boolean>
}

/** A key that is not allowed (escapes the storage folder, empty segments, hidden names…): a programming error. */
export class FileStorageKeyError extends Error {}

// Keys are "/"-separated segments of letters, digits, "-", "_" and "."; no segment starts with "." (so no "..",
// and no clash with the temporary files below). At most 512 characters (our own choice; S3 allows 1024 bytes).
const KEY_SEGMENT = /^[A-Za-z0-9_-][A-Za-z0-9._-]*$/

export function assertFileStorageKey(key: string): string {
  if (typeof key !== 'string' || !key || key.length > 512) throw new FileStorageKeyError(`Invalid storage key "${key}".`)
  const segments = key.split('/')
  if (!segments.every(s => KEY_SEGMENT.test(s))) throw new FileStorageKeyError(`Invalid storage key "${key}".`)
  return key
}

/** Local disk: each key is a file under `root`. Writes go to a temporary file in the same folder, then a rename. */
export function createLocalFileStorage(root: string): FileStorage {
  const base = resolve(root)

  function pathOf(key: string): string {
    assertFileStorageKey(key)
    const full = resolve(base, ...key.split('/'))
    const rel = relative(base, full)
    if (!rel || rel.startsWith('..') || isAbsolute(rel) || rel.split(sep).includes('..')) {
      throw new FileStorageKeyError(`Storage key "${key}" leaves the storage folder.`)
    }
    return full
  }

  async function info(key: string): Promise<FileStorageInfo | null> {
    try {
      const s = await stat(pathOf(key))
      return s.isFile() ? { key, size: s.size, modifiedAt: s.mtime } : null
    }
    catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT' || (err as NodeJS.ErrnoException).code === 'ENOTDIR') return null
      throw err
    }
  }

  return {
    async put(key, data) {
      const target = pathOf(key)
      await mkdir(dirname(target), { recursive: true })
      const tmp = resolve(dirname(target), `.${randomBytes(8).toString('hex')}.tmp`)
      try {
        if (data instanceof Readable) await pipeline(data, createWriteStream(tmp, { flags: 'wx', mode: 0o600 }))
        else await writeFile(tmp, data, { flag: 'wx', mode: 0o600 })
        // Flush to the disk before the rename makes the file visible under its key.
        const fh = await open(tmp, 'r')
        try { await fh.sync() }
        finally { await fh.close() }
        await rename(tmp, target)
      }
      catch (err) {
        await rm(tmp, { force: true })
        throw err
      }
      return (await info(key))!
    },

    async get(key, range) {
      const found = await info(key)
      if (!found) return null
      if (range && (range.start < 0 || range.end < range.start || range.end >= found.size)) {
        throw new RangeError(`Range ${range.start}-${range.end} is outside the ${found.size} bytes of "${key}".`)
      }
      const stream = createReadStream(pathOf(key), range ? { start: range.start, end: range.end } : {})
      return { ...found, stream, range: range ?? null }
    },

    stat: info,

    async delete(key) {
      await rm(pathOf(key), { force: true })
    },

    async exists(key) {
      return (await info(key)) !== null
    },
  }
}

/** FILES_DIR (default ./data/files), resolved from the working folder the server was started in. */
export function fileStorageDir(): string {
  return resolve(process.cwd(), process.env.FILES_DIR || './data/files')
}

let storage: FileStorage | undefined

/** The one accessor for file storage. */
export function useFileStorage(): FileStorage {
  storage ??= createLocalFileStorage(fileStorageDir())
  return storage
}
