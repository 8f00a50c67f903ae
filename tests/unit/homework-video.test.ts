import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { cleanVideoFileName, megabytesToBytes, mp4Duration, precheckVideo, videoTooLargeMessage, type ReadBytes } from '../../shared/utils/homework-video'

const FIXTURES = resolve(import.meta.dirname, '../fixtures')
const reader = (bytes: Uint8Array): ReadBytes => async (offset, length) => bytes.subarray(offset, offset + length)

function box(type: string, content: Buffer): Buffer {
  const head = Buffer.alloc(8)
  head.writeUInt32BE(8 + content.length, 0)
  head.write(type, 4, 'latin1')
  return Buffer.concat([head, content])
}
/** A version-0 movie header: 4 bytes version/flags, created, modified, time scale, duration (ISO/IEC 14496-12, from memory). */
function mvhd(scale: number, duration: number): Buffer {
  const c = Buffer.alloc(100)
  c.writeUInt32BE(scale, 12)
  c.writeUInt32BE(duration, 16)
  return box('mvhd', c)
}

describe('mp4Duration', () => {
  it('reads the movie header of the committed MP4 and MOV samples (3 s each: ffmpeg lavfi sources with duration=3)', async () => {
    for (const name of ['sample-3s.mp4', 'sample-3s.mov']) {
      const bytes = readFileSync(resolve(FIXTURES, name))
      const d = await mp4Duration(reader(bytes), bytes.length)
      expect(d, name).not.toBeNull()
      expect(d!).toBeGreaterThan(2.9)
      expect(d!).toBeLessThan(3.2)
    }
  })

  it('finds a movie box at the end of the file, after a large media box, by skipping', async () => {
    const ftyp = box('ftyp', Buffer.from('isom\0\0\x02\0isom', 'latin1'))
    const mdat = box('mdat', Buffer.alloc(50_000))
    const moov = box('moov', Buffer.concat([mvhd(1000, 12_500)]))
    const file = Buffer.concat([ftyp, mdat, moov])
    const reads: number[] = []
    const d = await mp4Duration(async (o, l) => { reads.push(o); return file.subarray(o, o + l) }, file.length)
    expect(d).toBe(12.5)
    expect(reads.length).toBeLessThan(6) // ftyp, mdat, moov, mvhd: headers only
  })

  it('reads a version-1 header with 64-bit duration', async () => {
    const c = Buffer.alloc(112)
    c[0] = 1
    c.writeUInt32BE(600, 20)
    c.writeUInt32BE(0, 24)
    c.writeUInt32BE(600 * 90, 28)
    const file = Buffer.concat([box('moov', box('mvhd', c))])
    expect(await mp4Duration(reader(file), file.length)).toBe(90)
  })

  it('gives null for no movie box, a zero time scale, or damaged sizes', async () => {
    const noMoov = Buffer.concat([box('ftyp', Buffer.from('isom', 'latin1')), box('free', Buffer.alloc(10))])
    expect(await mp4Duration(reader(noMoov), noMoov.length)).toBeNull()
    const zero = box('moov', mvhd(0, 100))
    expect(await mp4Duration(reader(zero), zero.length)).toBeNull()
    const damaged = Buffer.from(box('moov', mvhd(1000, 100)))
    damaged.writeUInt32BE(0xFFFFFF, 0) // claims to be far longer than the file
    expect(await mp4Duration(reader(damaged), damaged.length)).toBeNull()
    const webm = readFileSync(resolve(FIXTURES, 'sample-3s.webm'))
    expect(await mp4Duration(reader(webm), webm.length)).toBeNull()
  })
})

describe('precheckVideo', () => {
  const max = megabytesToBytes(2048)
  it('lets phone videos through and names the problem otherwise', () => {
    expect(megabytesToBytes(2048)).toBe(2 * 1024 ** 3)
    expect(precheckVideo({ name: 'IMG_0042.MOV', size: 80e6, type: 'video/quicktime' }, max)).toBeNull()
    expect(precheckVideo({ name: 'VID_20261201.mp4', size: 300e6, type: 'video/mp4' }, max)).toBeNull()
    expect(precheckVideo({ name: 'recording.webm', size: 5e6, type: '' }, max)).toBeNull()
    expect(precheckVideo({ name: 'clip', size: 5e6, type: 'video/mp4' }, max)).toBeNull()
    expect(precheckVideo(null, max)).toBe('Choose the video to send.')
    expect(precheckVideo({ name: 'a.mp4', size: 0 }, max)).toMatch(/empty/)
    expect(precheckVideo({ name: 'a.mp4', size: max + 1 }, max)).toMatch(/larger than the limit of 2048 MB/)
    expect(precheckVideo({ name: 'letter.pdf', size: 1000, type: 'application/pdf' }, max)).toMatch(/not a video we can play \(MP4, MOV or WebM\)/)
    expect(precheckVideo({ name: 'photo.jpg', size: 1000, type: '' }, max)).toMatch(/not a video/)
  })

  it('words the limit the same way for the page and the server', () => {
    expect(videoTooLargeMessage(3 * 1024 ** 3, megabytesToBytes(2048))).toBe('This video is 3072 MB, larger than the limit of 2048 MB. Record a shorter clip, or trim it on the phone before sending.')
    expect(videoTooLargeMessage(null, megabytesToBytes(1))).toBe('This video is larger than the limit of 1 MB. Record a shorter clip, or trim it on the phone before sending.')
  })
})

describe('cleanVideoFileName', () => {
  it('keeps the name only, without folders or control characters', () => {
    expect(cleanVideoFileName('C:\\Users\\x\\Kitchen search.mp4')).toBe('Kitchen search.mp4')
    expect(cleanVideoFileName('../../etc/passwd')).toBe('passwd')
    expect(cleanVideoFileName('a\u0000b\n.mov')).toBe('ab.mov')
    expect(cleanVideoFileName('')).toBe('video')
    expect(cleanVideoFileName(null)).toBe('video')
    expect([...cleanVideoFileName('é'.repeat(300))].length).toBe(200)
  })
})
