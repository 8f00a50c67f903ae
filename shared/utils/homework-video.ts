// Homework videos: which files we accept (judged by their bytes), the size pre-check the page can do, and reading a
// video's duration from an MP4/MOV's movie header when the metadata library finds none (a video without sound).
// Pure: no I/O (the duration reader is given a function that reads bytes).
import { describeTypes, formatBytes, type AcceptedType } from './documents'

// MIME types as the `file-type` package reports them. Phones record MP4 (Android, H.264), MOV (iPhone, QuickTime)
// or WebM (browsers' own recorders) (common practice).
export const VIDEO_MP4: AcceptedType = { mime: 'video/mp4', ext: 'mp4', label: 'MP4', inline: true }
export const VIDEO_MOV: AcceptedType = { mime: 'video/quicktime', ext: 'mov', label: 'MOV', inline: true }
export const VIDEO_WEBM: AcceptedType = { mime: 'video/webm', ext: 'webm', label: 'WebM', inline: true }
export const VIDEO_TYPES: readonly AcceptedType[] = [VIDEO_MP4, VIDEO_MOV, VIDEO_WEBM]
/** For the file picker's `accept`: a hint to the browser only; the server checks the bytes. */
export const VIDEO_ACCEPT = 'video/mp4,video/quicktime,video/webm,.mp4,.m4v,.mov,.webm'
/** How many leading bytes decide a video's type (file-type reads at most this many for these containers; from memory). */
export const VIDEO_SNIFF_BYTES = 4100

const MIB = 1024 * 1024
/** The default largest video: 2 GiB (the requirement; a phone's 10-minute 1080p clip is 1-2 GB, from memory). */
export const DEFAULT_MAX_UPLOAD_MEGABYTES = 2048
/** An upload without any bytes for this long is removed (common practice: a day, so a phone offline overnight can resume). */
export const DEFAULT_STALE_UPLOAD_HOURS = 24

export function megabytesToBytes(mb: number): number {
  return Math.round(mb * MIB)
}

/** The message for a video over the limit (the same words in the page and in the server's 413). */
export function videoTooLargeMessage(size: number | null, maxBytes: number): string {
  const head = size === null ? 'This video is larger than' : `This video is ${formatBytes(size)}, larger than`
  return `${head} the limit of ${formatBytes(maxBytes)}. Record a shorter clip, or trim it on the phone before sending.`
}

export function notAVideoMessage(): string {
  return `This file is not a video we can play (${describeTypes(VIDEO_TYPES)}), whatever its name says. Choose the video from the phone's camera roll and try again.`
}

/**
 * What the page can tell before sending (the server decides again, from the bytes): a message for a file that is
 * missing, empty, too big or clearly not a video by its type or name; null when it may go.
 */
export function precheckVideo(file: { name: string, size: number, type?: string } | null | undefined, maxBytes: number): string | null {
  if (!file) return 'Choose the video to send.'
  if (file.size === 0) return 'This file is empty. Choose the video again from the phone\'s camera roll.'
  if (file.size > maxBytes) return videoTooLargeMessage(file.size, maxBytes)
  const ext = file.name.includes('.') ? file.name.split('.').pop()!.toLowerCase() : ''
  const typeSaysOther = !!file.type && !file.type.startsWith('video/')
  const nameSaysOther = !!ext && !['mp4', 'm4v', 'mov', 'qt', 'webm'].includes(ext)
  if (typeSaysOther || (nameSaysOther && !file.type?.startsWith('video/'))) return notAVideoMessage()
  return null
}

/** A safe file name to keep (shown to the trainer): no folders, no control characters, at most 200 characters. */
export function cleanVideoFileName(name: string | null | undefined): string {
  // eslint-disable-next-line no-control-regex
  const base = (name ?? '').split(/[/\\]/).pop()!.replace(/[\u0000-\u001f\u007f]/g, '').replace(/\s+/g, ' ').trim()
  return [...base].slice(0, 200).join('') || 'video'
}

export type ReadBytes = (offset: number, length: number) => Promise<Uint8Array>

/**
 * The duration in seconds from an MP4/MOV file's movie header ("moov" → "mvhd": time scale and duration; ISO/IEC
 * 14496-12 section 8.2.2 and Apple's QuickTime File Format, from memory), walking the top-level boxes by their
 * sizes (so a "moov" at the end of a large file costs a few small reads). Null when there is none or it is damaged.
 */
export async function mp4Duration(read: ReadBytes, fileSize: number): Promise<number | null> {
  const u32 = (b: Uint8Array, o: number) => ((b[o]! << 24) >>> 0) + (b[o + 1]! << 16) + (b[o + 2]! << 8) + b[o + 3]!
  const u64 = (b: Uint8Array, o: number) => u32(b, o) * 2 ** 32 + u32(b, o + 4)
  const type = (b: Uint8Array, o: number) => String.fromCharCode(b[o]!, b[o + 1]!, b[o + 2]!, b[o + 3]!)

  /** The boxes directly inside [start, end): their type, where their content starts, and their end. */
  async function* boxes(start: number, end: number) {
    let at = start
    for (let guard = 0; at + 8 <= end && guard < 10_000; guard++) {
      const head = await read(at, 16)
      if (head.length < 8) return
      let size = u32(head, 0)
      let headerLength = 8
      if (size === 1) {
        if (head.length < 16) return
        size = u64(head, 8)
        headerLength = 16
      }
      else if (size === 0) size = end - at // runs to the end of its parent
      if (size < headerLength || at + size > end) return
      yield { type: type(head, 4), content: at + headerLength, end: at + size }
      at += size
    }
  }

  for await (const box of boxes(0, fileSize)) {
    if (box.type !== 'moov') continue
    for await (const inner of boxes(box.content, box.end)) {
      if (inner.type !== 'mvhd') continue
      const b = await read(inner.content, 32)
      if (b.length < 20) return null
      const version = b[0]
      const [scale, duration] = version === 1 ? (b.length >= 32 ? [u32(b, 20), u64(b, 24)] : [0, 0]) : [u32(b, 12), u32(b, 16)]
      if (!scale || !duration || duration === 0xFFFFFFFF) return null
      return duration / scale
    }
    return null
  }
  return null
}
