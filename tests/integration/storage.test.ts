// The local-disk file storage backend, against a real temporary folder.
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { resolve } from 'node:path'
import { Readable } from 'node:stream'
import { afterAll, describe, expect, it } from 'vitest'
import { assertFileStorageKey, createLocalFileStorage, FileStorageKeyError } from '../../server/utils/storage'
import { ROOT } from '../support/stack'

const root = mkdtempSync(resolve(ROOT, 'tests/.tmp/storage-'))
const storage = createLocalFileStorage(root)
afterAll(() => rmSync(root, { recursive: true, force: true }))

async function text(stream: Readable) {
  const chunks: Buffer[] = []
  for await (const c of stream) chunks.push(c as Buffer)
  return Buffer.concat(chunks).toString('utf8')
}
function allFiles(dir: string): string[] {
  return readdirSync(dir, { recursive: true, withFileTypes: true }).filter(d => d.isFile()).map(d => resolve(d.parentPath, d.name))
}

describe('local file storage', () => {
  it('writes, reads whole and by range, stats, replaces and deletes by key', async () => {
    const info = await storage.put('clients/abc/documents/one', Buffer.from('hello world'), { contentType: 'text/plain' })
    expect(info.size).toBe(11)
    expect(readFileSync(resolve(root, 'clients/abc/documents/one'), 'utf8')).toBe('hello world')
    expect(await storage.exists('clients/abc/documents/one')).toBe(true)
    const whole = await storage.get('clients/abc/documents/one')
    expect(whole!.size).toBe(11)
    expect(await text(whole!.stream)).toBe('hello world')
    const part = await storage.get('clients/abc/documents/one', { start: 6, end: 10 })
    expect(part!.size).toBe(11)
    expect(await text(part!.stream)).toBe('world')
    await expect(storage.get('clients/abc/documents/one', { start: 5, end: 11 })).rejects.toThrow(RangeError)

    await storage.put('clients/abc/documents/one', Readable.from([Buffer.from('new '), Buffer.from('bytes')]), { contentType: 'text/plain' })
    expect((await storage.stat('clients/abc/documents/one'))!.size).toBe(9)
    expect(await text((await storage.get('clients/abc/documents/one'))!.stream)).toBe('new bytes')

    await storage.delete('clients/abc/documents/one')
    expect(await storage.exists('clients/abc/documents/one')).toBe(false)
    expect(await storage.get('clients/abc/documents/one')).toBeNull()
    expect(await storage.stat('clients/abc/documents/one')).toBeNull()
    await storage.delete('clients/abc/documents/one') // deleting twice is fine
    expect(allFiles(root)).toEqual([])
  })

  it('leaves no file and no temporary file when the data stream fails half-way', async () => {
    const failing = new Readable({
      read() {
        this.push(Buffer.from('half a file'))
        this.destroy(new Error('connection lost'))
      },
    })
    await expect(storage.put('dogs/d1/photo', failing, { contentType: 'image/png' })).rejects.toThrow('connection lost')
    expect(await storage.exists('dogs/d1/photo')).toBe(false)
    expect(allFiles(root)).toEqual([])
  })

  it('keeps the old object whole until a replacement is complete', async () => {
    await storage.put('k/whole', Buffer.from('old and whole'), { contentType: 'text/plain' })
    const failing = new Readable({ read() { this.destroy(new Error('stop')) } })
    await expect(storage.put('k/whole', failing, { contentType: 'text/plain' })).rejects.toThrow('stop')
    expect(readFileSync(resolve(root, 'k/whole'), 'utf8')).toBe('old and whole')
    expect(allFiles(root)).toEqual([resolve(root, 'k/whole')])
    await storage.delete('k/whole')
  })

  it('refuses keys that could leave the folder or clash with temporary files', async () => {
    for (const bad of ['../escape', 'a/../../b', '/etc/passwd', 'a//b', '', 'a/.hidden', '.tmp', 'a\\b', 'a/b/', 'x'.repeat(513), 'a b', 'ü']) {
      expect(() => assertFileStorageKey(bad), bad).toThrow(FileStorageKeyError)
      await expect(storage.put(bad, Buffer.from('x'), { contentType: 'text/plain' })).rejects.toThrow(FileStorageKeyError)
    }
    await expect(storage.get('../../package.json')).rejects.toThrow(FileStorageKeyError)
    await expect(storage.delete('../tests')).rejects.toThrow(FileStorageKeyError)
    expect(assertFileStorageKey('clients/1b2c-3d/documents/file.v2_final')).toBe('clients/1b2c-3d/documents/file.v2_final')
  })
})
