// File storage: one interface for the whole app, addressed by keys (like an object store), never by paths.
// Two backends: local disk under FILES_DIR (the default), and an S3-compatible bucket when S3_BUCKET is set (put ~
// a streamed multipart upload, get with a range ~ GetObject with Range, stat ~ HeadObject, delete ~ DeleteObject),
// so several app instances can share the files. tests/integration/storage.test.ts runs the same cases on both.
import { DeleteObjectCommand, GetObjectCommand, HeadObjectCommand, ListObjectsV2Command, S3Client, type S3ClientConfig } from '@aws-sdk/client-s3'
import { Upload } from '@aws-sdk/lib-storage'
import { createReadStream, createWriteStream } from 'node:fs'
import { mkdir, open, readdir, rename, rm, stat, writeFile } from 'node:fs/promises'
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
  /** Every object whose key starts with `prefix` (for the orphan sweep). */
  list(prefix: string): AsyncIterable<FileStorageInfo>
  /**
   * Half-written temporary files a crash left behind (local disk only; an S3 upload that fails is aborted, and a
   * bucket lifecycle rule removes incomplete multipart uploads). `remove` deletes one.
   */
  listTemporary(): AsyncIterable<{ name: string, modifiedAt: Date, remove: () => Promise<void> }>
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

    async* list(prefix) {
      for (const { path, name } of await walk(base)) {
        if (name.startsWith('.')) continue
        const key = relative(base, path).split(sep).join('/')
        if (!key.startsWith(prefix)) continue
        const s = await stat(path).catch(() => null)
        if (s?.isFile()) yield { key, size: s.size, modifiedAt: s.mtime }
      }
    },

    async* listTemporary() {
      for (const { path, name } of await walk(base)) {
        if (!/^\.[0-9a-f]+\.tmp$/.test(name)) continue
        const s = await stat(path).catch(() => null)
        if (s?.isFile()) yield { name: relative(base, path), modifiedAt: s.mtime, remove: () => rm(path, { force: true }) }
      }
    },
  }
}

/** Every file under `dir` (recursively), with its name. */
async function walk(dir: string): Promise<Array<{ path: string, name: string }>> {
  const entries = await readdir(dir, { withFileTypes: true }).catch(() => [])
  const out: Array<{ path: string, name: string }> = []
  for (const e of entries) {
    const full = resolve(dir, e.name)
    if (e.isDirectory()) out.push(...await walk(full))
    else if (e.isFile()) out.push({ path: full, name: e.name })
  }
  return out
}

/** FILES_DIR (default ./data/files), resolved from the working folder the server was started in. */
export function fileStorageDir(): string {
  return resolve(process.cwd(), process.env.FILES_DIR || './data/files')
}

export interface S3FileStorageOptions {
  bucket: string
  /** An S3-compatible service's address (e.g. http://127.0.0.1:4568); unset for AWS itself. */
  endpoint?: string
  region?: string
  accessKeyId?: string
  secretAccessKey?: string
  /** Address the bucket in the path (endpoint/bucket/key) rather than as a host name; most S3-compatible servers need it. */
  forcePathStyle?: boolean
}

/** A missing object: S3 answers 404 with NotFound (HEAD) or NoSuchKey (GET). */
function isMissing(err: unknown): boolean {
  const e = err as { name?: string, Code?: string, $metadata?: { httpStatusCode?: number } }
  return e?.name === 'NotFound' || e?.name === 'NoSuchKey' || e?.Code === 'NoSuchKey' || e?.$metadata?.httpStatusCode === 404
}

// Multipart parts of 8 MiB, at most 4 in flight: memory per upload stays near 32 MiB whatever the file's size, and a
// 2 GiB video takes 256 parts, far below S3's 10,000 (our own choice; S3's minimum part is 5 MiB, AWS documentation).
const S3_PART_BYTES = 8 * 1024 * 1024
const S3_PARTS_IN_FLIGHT = 4

/** An S3-compatible bucket: each key is an object. A put is a streamed (multipart) upload, visible only once complete. */
export function createS3FileStorage(opts: S3FileStorageOptions): FileStorage {
  const config: S3ClientConfig = {
    region: opts.region || 'us-east-1',
    forcePathStyle: !!opts.forcePathStyle,
    // Only send and check checksums where S3 requires them: many S3-compatible servers do not understand the
    // newer default (aws-chunked bodies with trailing CRC32 checksums).
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    ...(opts.endpoint ? { endpoint: opts.endpoint } : {}),
    ...(opts.accessKeyId && opts.secretAccessKey ? { credentials: { accessKeyId: opts.accessKeyId, secretAccessKey: opts.secretAccessKey } } : {}),
  }
  const client = new S3Client(config)
  const Bucket = opts.bucket

  async function info(key: string): Promise<FileStorageInfo | null> {
    assertFileStorageKey(key)
    try {
      const head = await client.send(new HeadObjectCommand({ Bucket, Key: key }))
      return { key, size: Number(head.ContentLength ?? 0), modifiedAt: head.LastModified ?? new Date(0) }
    }
    catch (err) {
      if (isMissing(err)) return null
      throw err
    }
  }

  return {
    async put(key, data, { contentType }) {
      assertFileStorageKey(key)
      const upload = new Upload({
        client,
        params: { Bucket, Key: key, Body: data, ContentType: contentType },
        partSize: S3_PART_BYTES,
        queueSize: S3_PARTS_IN_FLIGHT,
        // A failed upload is aborted, so its parts never become an object (and do not linger as storage costs).
        leavePartsOnError: false,
      })
      try {
        await upload.done()
      }
      catch (err) {
        if (data instanceof Readable && !data.destroyed) data.destroy()
        throw err
      }
      const stored = await info(key)
      if (!stored) throw new Error(`The object "${key}" was written but cannot be found in bucket ${Bucket}.`)
      return stored
    },

    async get(key, range) {
      const found = await info(key)
      if (!found) return null
      if (range && (range.start < 0 || range.end < range.start || range.end >= found.size)) {
        throw new RangeError(`Range ${range.start}-${range.end} is outside the ${found.size} bytes of "${key}".`)
      }
      try {
        const res = await client.send(new GetObjectCommand({ Bucket, Key: key, ...(range ? { Range: `bytes=${range.start}-${range.end}` } : {}) }))
        const body = res.Body
        const stream = body instanceof Readable ? body : Readable.fromWeb(body as unknown as import('node:stream/web').ReadableStream)
        return { ...found, stream, range: range ?? null }
      }
      catch (err) {
        if (isMissing(err)) return null
        throw err
      }
    },

    stat: info,

    async delete(key) {
      assertFileStorageKey(key)
      try {
        await client.send(new DeleteObjectCommand({ Bucket, Key: key }))
      }
      catch (err) {
        if (!isMissing(err)) throw err
      }
    },

    async exists(key) {
      return (await info(key)) !== null
    },

    async* list(prefix) {
      let ContinuationToken: string | undefined
      do {
        const page = await client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix, ContinuationToken }))
        for (const o of page.Contents ?? []) {
          if (o.Key) yield { key: o.Key, size: Number(o.Size ?? 0), modifiedAt: o.LastModified ?? new Date(0) }
        }
        ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined
      } while (ContinuationToken)
    },

    async* listTemporary() {
      // Nothing: a failed multipart upload is aborted (see put); a lifecycle rule cleans any the process could not abort.
    },
  }
}

/** The S3 settings from the environment, or null when S3_BUCKET is not set (then files stay on local disk). */
export function s3OptionsFromEnv(env: NodeJS.ProcessEnv = process.env): S3FileStorageOptions | null {
  if (!env.S3_BUCKET) return null
  return {
    bucket: env.S3_BUCKET,
    endpoint: env.S3_ENDPOINT || undefined,
    region: env.S3_REGION || undefined,
    accessKeyId: env.S3_ACCESS_KEY_ID || undefined,
    secretAccessKey: env.S3_SECRET_ACCESS_KEY || undefined,
    forcePathStyle: /^(1|true|yes)$/i.test(env.S3_FORCE_PATH_STYLE ?? ''),
  }
}

let storage: FileStorage | undefined

/** The one accessor for file storage: the S3 bucket when S3_BUCKET is set, else local disk under FILES_DIR. */
export function useFileStorage(): FileStorage {
  if (!storage) {
    const s3 = s3OptionsFromEnv()
    storage = s3 ? createS3FileStorage(s3) : createLocalFileStorage(fileStorageDir())
  }
  return storage
}
