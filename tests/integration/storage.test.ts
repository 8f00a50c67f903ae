// The file storage backends, against real storage: the local-disk one in a temporary folder, and the S3 one against
// the fake S3 (fake-services/s3, s3rver) started here. The same cases run on both.
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { resolve } from 'node:path'
import { Readable } from 'node:stream'
import { ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { assertFileStorageKey, createLocalFileStorage, createS3FileStorage, FileStorageKeyError, s3OptionsFromEnv, type FileStorage } from '../../server/utils/storage'
import { startFakeS3, type FakeS3 } from '../../fake-services/s3/server.mjs'
import { ROOT } from '../support/stack'

async function bytes(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = []
  for await (const c of stream) chunks.push(c as Buffer)
  return Buffer.concat(chunks)
}
const text = async (stream: Readable) => (await bytes(stream)).toString('utf8')

/** A deterministic byte pattern (no repetition within 251 bytes), so a misplaced range shows. */
function pattern(start: number, length: number): Buffer {
  const b = Buffer.alloc(length)
  for (let i = 0; i < length; i++) b[i] = (start + i) % 251
  return b
}
function patternStream(total: number, chunk = 1024 * 1024): Readable {
  let sent = 0
  return new Readable({
    read() {
      if (sent >= total) return this.push(null)
      const n = Math.min(chunk, total - sent)
      this.push(pattern(sent, n))
      sent += n
    },
  })
}

interface Backend { name: string, storage: () => FileStorage, keys: () => Promise<string[]> }

let localRoot = ''
let fake: FakeS3 | null = null
let s3: FileStorage | null = null
let s3Client: S3Client | null = null

beforeAll(async () => {
  localRoot = mkdtempSync(resolve(ROOT, 'tests/.tmp/storage-'))
  fake = await startFakeS3({ directory: mkdtempSync(resolve(ROOT, 'tests/.tmp/fake-s3-')), quiet: true })
  const opts = s3OptionsFromEnv(fake.env as NodeJS.ProcessEnv)!
  s3 = createS3FileStorage(opts)
  s3Client = new S3Client({ region: opts.region, endpoint: opts.endpoint, forcePathStyle: true, credentials: { accessKeyId: opts.accessKeyId!, secretAccessKey: opts.secretAccessKey! } })
})
afterAll(async () => {
  s3Client?.destroy()
  await fake?.close()
  rmSync(localRoot, { recursive: true, force: true })
  if (fake) rmSync(fake.directory, { recursive: true, force: true })
})

const local: Backend = {
  name: 'local disk',
  storage: () => createLocalFileStorage(localRoot),
  // Every file under the folder, temporary ones included, as keys.
  keys: async () => readdirSync(localRoot, { recursive: true, withFileTypes: true }).filter(d => d.isFile())
    .map(d => resolve(d.parentPath, d.name).slice(localRoot.length + 1).split('\\').join('/')).sort(),
}
const bucket: Backend = {
  name: 'S3 (fake s3rver)',
  storage: () => s3!,
  keys: async () => ((await s3Client!.send(new ListObjectsV2Command({ Bucket: fake!.bucket }))).Contents ?? []).map(o => o.Key!).sort(),
}

describe.each([local, bucket])('file storage: $name', (backend) => {
  it('writes, reads whole and by range, stats, replaces and deletes by key', async () => {
    const storage = backend.storage()
    const info = await storage.put('clients/abc/documents/one', Buffer.from('hello world'), { contentType: 'text/plain' })
    expect(info.size).toBe(11)
    expect(info.key).toBe('clients/abc/documents/one')
    expect(await backend.keys()).toEqual(['clients/abc/documents/one'])
    expect(await storage.exists('clients/abc/documents/one')).toBe(true)
    const whole = await storage.get('clients/abc/documents/one')
    expect(whole!.size).toBe(11)
    expect(whole!.range).toBeNull()
    expect(await text(whole!.stream)).toBe('hello world')
    const part = await storage.get('clients/abc/documents/one', { start: 6, end: 10 })
    expect(part!.size).toBe(11)
    expect(part!.range).toEqual({ start: 6, end: 10 })
    expect(await text(part!.stream)).toBe('world')
    expect(await text((await storage.get('clients/abc/documents/one', { start: 0, end: 0 }))!.stream)).toBe('h')
    await expect(storage.get('clients/abc/documents/one', { start: 5, end: 11 })).rejects.toThrow(RangeError)

    await storage.put('clients/abc/documents/one', Readable.from([Buffer.from('new '), Buffer.from('bytes')]), { contentType: 'text/plain' })
    expect((await storage.stat('clients/abc/documents/one'))!.size).toBe(9)
    expect(await text((await storage.get('clients/abc/documents/one'))!.stream)).toBe('new bytes')

    await storage.delete('clients/abc/documents/one')
    expect(await storage.exists('clients/abc/documents/one')).toBe(false)
    expect(await storage.get('clients/abc/documents/one')).toBeNull()
    expect(await storage.stat('clients/abc/documents/one')).toBeNull()
    await storage.delete('clients/abc/documents/one') // deleting twice is fine
    expect(await backend.keys()).toEqual([])
  })

  it('streams a large object in and serves ranges of it, across parts', async () => {
    const storage = backend.storage()
    const size = 21 * 1024 * 1024 + 123 // more than two 8 MiB parts of a multipart upload, and a ragged end
    const info = await storage.put('homework/c1/big.mp4', patternStream(size), { contentType: 'video/mp4' })
    expect(info.size).toBe(size)
    for (const [start, end] of [[0, 99], [8 * 1024 * 1024 - 10, 8 * 1024 * 1024 + 10], [size - 500, size - 1]] as const) {
      const got = await storage.get('homework/c1/big.mp4', { start, end })
      expect((await bytes(got!.stream)).equals(pattern(start, end - start + 1)), `${start}-${end}`).toBe(true)
    }
    const whole = await bytes((await storage.get('homework/c1/big.mp4'))!.stream)
    expect(whole.length).toBe(size)
    expect(whole.equals(pattern(0, size))).toBe(true)
    await storage.delete('homework/c1/big.mp4')
    expect(await backend.keys()).toEqual([])
  })

  it('leaves no object and no temporary file when the data stream fails half-way', async () => {
    const storage = backend.storage()
    const failing = new Readable({
      read() {
        this.push(Buffer.from('half a file'))
        this.destroy(new Error('connection lost'))
      },
    })
    await expect(storage.put('dogs/d1/photo', failing, { contentType: 'image/png' })).rejects.toThrow('connection lost')
    expect(await storage.exists('dogs/d1/photo')).toBe(false)
    expect(await backend.keys()).toEqual([])
  })

  it('keeps the old object whole until a replacement is complete', async () => {
    const storage = backend.storage()
    await storage.put('k/whole', Buffer.from('old and whole'), { contentType: 'text/plain' })
    const failing = new Readable({ read() { this.destroy(new Error('stop')) } })
    await expect(storage.put('k/whole', failing, { contentType: 'text/plain' })).rejects.toThrow('stop')
    expect(await text((await storage.get('k/whole'))!.stream)).toBe('old and whole')
    expect(await backend.keys()).toEqual(['k/whole'])
    await storage.delete('k/whole')
  })

  it('refuses keys that could leave the folder or clash with temporary files', async () => {
    const storage = backend.storage()
    for (const bad of ['../escape', 'a/../../b', '/etc/passwd', 'a//b', '', 'a/.hidden', '.tmp', 'a\\b', 'a/b/', 'x'.repeat(513), 'a b', 'ü']) {
      expect(() => assertFileStorageKey(bad), bad).toThrow(FileStorageKeyError)
      await expect(storage.put(bad, Buffer.from('x'), { contentType: 'text/plain' })).rejects.toThrow(FileStorageKeyError)
    }
    await expect(storage.get('../../package.json')).rejects.toThrow(FileStorageKeyError)
    await expect(storage.stat('a/../b')).rejects.toThrow(FileStorageKeyError)
    await expect(storage.delete('../tests')).rejects.toThrow(FileStorageKeyError)
    expect(assertFileStorageKey('clients/1b2c-3d/documents/file.v2_final')).toBe('clients/1b2c-3d/documents/file.v2_final')
    expect(await backend.keys()).toEqual([])
  })
})

describe('file storage specifics', () => {
  it('local disk: the bytes sit in a file under the folder, named by the key', async () => {
    const storage = local.storage()
    await storage.put('clients/abc/documents/two', Buffer.from('on disk'), { contentType: 'text/plain' })
    expect(readFileSync(resolve(localRoot, 'clients/abc/documents/two'), 'utf8')).toBe('on disk')
    await storage.delete('clients/abc/documents/two')
  })

  it('S3: the storage is chosen by S3_BUCKET, with path-style addressing for S3-compatible servers', () => {
    expect(s3OptionsFromEnv({})).toBeNull()
    expect(s3OptionsFromEnv({ S3_BUCKET: 'b', S3_ENDPOINT: 'http://127.0.0.1:1', S3_FORCE_PATH_STYLE: 'true', S3_ACCESS_KEY_ID: 'k', S3_SECRET_ACCESS_KEY: 's' }))
      .toEqual({ bucket: 'b', endpoint: 'http://127.0.0.1:1', region: undefined, accessKeyId: 'k', secretAccessKey: 's', forcePathStyle: true })
    expect(s3OptionsFromEnv({ S3_BUCKET: 'b' })!.forcePathStyle).toBe(false)
  })

  it('S3: storage down is an error the caller sees (not a missing file), and works again afterwards', async () => {
    const storage = bucket.storage()
    await storage.put('k/kept', Buffer.from('kept'), { contentType: 'text/plain' })
    fake!.setDown(true)
    try {
      await expect(storage.stat('k/kept')).rejects.toBeTruthy()
      await expect(storage.put('k/new', Buffer.from('new'), { contentType: 'text/plain' })).rejects.toBeTruthy()
    }
    finally { fake!.setDown(false) }
    expect(await text((await storage.get('k/kept'))!.stream)).toBe('kept')
    expect(await storage.exists('k/new')).toBe(false)
    await storage.delete('k/kept')
  })
})
