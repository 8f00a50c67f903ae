// Documents on a client file and the dog's photo: which files we accept, how big, and how a download is named.
// Pure: no I/O. The server decides a file's type from its bytes (the `file-type` package) and asks here whether
// that type is one we keep.

export const DOCUMENT_KINDS = ['clinician-letter', 'consent', 'vaccination-record', 'insurance', 'assessment-report', 'other'] as const
export type DocumentKind = (typeof DOCUMENT_KINDS)[number]
export const DOCUMENT_KIND_LABELS: Record<DocumentKind, string> = {
  'clinician-letter': 'Clinician\'s letter',
  'consent': 'Consent form',
  'vaccination-record': 'Vaccination record',
  'insurance': 'Insurance',
  'assessment-report': 'Assessment report',
  'other': 'Other',
}

const MB = 1024 * 1024
/** Largest document we keep: 15 MB (our own choice: a multi-page scan at 300 dpi fits, a video does not). */
export const DOCUMENT_MAX_BYTES = 15 * MB
/** Largest dog photo we keep: 8 MB (our own choice: a full-resolution phone photo fits). */
export const DOG_PHOTO_MAX_BYTES = 8 * MB
/**
 * Room for the multipart framing and the small text fields around the file, used to refuse a request by its
 * Content-Length before reading it (our own choice; the framing itself is a few hundred bytes).
 */
export const MULTIPART_OVERHEAD_BYTES = 64 * 1024
export const TITLE_MAX = 200

export interface AcceptedType { mime: string, ext: string, label: string, inline: boolean }

// MIME types as `file-type` reports them (HEIF images from phones come as image/heic or image/heif). Browsers show
// PDF, JPEG and PNG themselves; HEIC is stored as sent and always downloaded (most desktop browsers cannot show it;
// common practice).
const PDF: AcceptedType = { mime: 'application/pdf', ext: 'pdf', label: 'PDF', inline: true }
const JPEG: AcceptedType = { mime: 'image/jpeg', ext: 'jpg', label: 'JPEG', inline: true }
const PNG: AcceptedType = { mime: 'image/png', ext: 'png', label: 'PNG', inline: true }
const HEIC: AcceptedType = { mime: 'image/heic', ext: 'heic', label: 'HEIC', inline: false }
const HEIF: AcceptedType = { mime: 'image/heif', ext: 'heif', label: 'HEIC', inline: false }

export const DOCUMENT_TYPES: readonly AcceptedType[] = [PDF, JPEG, PNG, HEIC, HEIF]
export const DOG_PHOTO_TYPES: readonly AcceptedType[] = [JPEG, PNG, HEIC, HEIF]
/** A business logo is printed in PDFs, which embed PNG and JPEG only. */
export const LOGO_TYPES: readonly AcceptedType[] = [PNG, JPEG]
export const LOGO_MAX_BYTES = 512 * 1024
/** For the file picker's `accept`: a hint to the browser only; the server checks the bytes. */
export const DOCUMENT_ACCEPT = '.pdf,.jpg,.jpeg,.png,.heic,application/pdf,image/jpeg,image/png,image/heic,image/heif'
export const DOG_PHOTO_ACCEPT = '.jpg,.jpeg,.png,.heic,image/jpeg,image/png,image/heic,image/heif'

/** The accepted type for a detected MIME type, or null when we do not keep files of that type. */
export function acceptedType(detectedMime: string | undefined | null, allowed: readonly AcceptedType[]): AcceptedType | null {
  if (!detectedMime) return null
  return allowed.find(t => t.mime === detectedMime) ?? null
}

/** "PDF, JPEG, PNG or HEIC" */
export function describeTypes(allowed: readonly AcceptedType[]): string {
  const labels = [...new Set(allowed.map(t => t.label))]
  return labels.length < 2 ? (labels[0] ?? '') : `${labels.slice(0, -1).join(', ')} or ${labels.at(-1)}`
}

/** "840 bytes", "12 KB", "3.4 MB" (binary units, as the limits above). */
export function formatBytes(n: number): string {
  if (!Number.isFinite(n) || n < 0) return '—'
  if (n < 1024) return `${n} byte${n === 1 ? '' : 's'}`
  if (n < MB) return `${Math.round(n / 1024)} KB`
  const mb = n / MB
  return `${mb < 10 ? mb.toFixed(1).replace(/\.0$/, '') : Math.round(mb)} MB`
}

// Characters that cannot appear in a file name on Windows or that separate paths anywhere, and control characters.
// eslint-disable-next-line no-control-regex
const UNSAFE_IN_NAME = /[\u0000-\u001f\u007f<>:"/\\|?*]/g

/** The title a document gets when none is typed: its file name without folders or extension. */
export function titleFromFileName(fileName: string): string {
  const base = fileName.split(/[/\\]/).pop() ?? ''
  const dot = base.lastIndexOf('.')
  const stem = dot > 0 ? base.slice(0, dot) : base
  // eslint-disable-next-line no-control-regex
  const clean = stem.replace(/[\u0000-\u001f\u007f]/g, '').replace(/\s+/g, ' ').trim().slice(0, TITLE_MAX).trim()
  return clean || 'Untitled document'
}

// Letters that Unicode decomposition does not reduce to ASCII, spelled the usual way (common practice).
const ASCII_SPELLING: Record<string, string> = {
  'ß': 'ss', 'ẞ': 'SS', 'æ': 'ae', 'Æ': 'AE', 'ø': 'o', 'Ø': 'O', 'œ': 'oe', 'Œ': 'OE', 'đ': 'd', 'Đ': 'D',
  'ł': 'l', 'Ł': 'L', 'þ': 'th', 'Þ': 'Th', 'ð': 'd', 'Ð': 'D', 'ı': 'i',
  '‘': '\'', '’': '\'', '“': '\'', '”': '\'', '–': '-', '—': '-',
}

/**
 * A file name for a download: the title made safe for every common file system (no path separators, no
 * reserved characters, no leading dots), at most 150 characters, with the extension of the stored type.
 * Returns the name itself (UTF-8) and an ASCII-only fallback for the plain `filename=` parameter.
 */
export function safeDownloadName(title: string, ext: string): { name: string, ascii: string } {
  const cleanExt = ext.replace(/[^a-z0-9]/gi, '').toLowerCase() || 'bin'
  let stem = title.normalize('NFC').replace(/"/g, '\'').replace(UNSAFE_IN_NAME, '_').replace(/\s+/g, ' ').trim()
  stem = stem.replace(/^[.\s_]+/, '').replace(/[.\s]+$/, '')
  if (stem.toLowerCase().endsWith(`.${cleanExt}`)) stem = stem.slice(0, -(cleanExt.length + 1)).replace(/[.\s]+$/, '')
  stem = [...stem].slice(0, 150).join('').trim() || 'document'
  const asciiStem = [...stem].map(c => ASCII_SPELLING[c] ?? c).join('')
    .normalize('NFKD').replace(/[\u0300-\u036f]/g, '')
    .replace(/[^\x20-\x7e]/g, '_').replace(/[\\"]/g, '_')
    .trim() || 'document'
  return { name: `${stem}.${cleanExt}`, ascii: `${asciiStem}.${cleanExt}` }
}

/**
 * RFC 5987 ext-value encoding: UTF-8, percent-encoding every byte outside attr-char
 * (ALPHA / DIGIT / "!#$&+-.^_`|~"; RFC 5987 section 3.2.1).
 */
export function encodeRfc5987(value: string): string {
  return encodeURIComponent(value).replace(/['()*]/g, c => `%${c.charCodeAt(0).toString(16).toUpperCase()}`)
}

/** `attachment; filename="<ascii>"; filename*=UTF-8''<encoded>` (RFC 6266 section 4.3, with RFC 5987). */
export function contentDisposition(disposition: 'attachment' | 'inline', title: string, ext: string): string {
  const { name, ascii } = safeDownloadName(title, ext)
  return `${disposition}; filename="${ascii}"; filename*=UTF-8''${encodeRfc5987(name)}`
}

export type ByteRange = { start: number, end: number }

/**
 * One byte range from a Range header (RFC 9110 section 14.1.2): `bytes=0-99`, `bytes=100-`, `bytes=-500`.
 * Returns null to send the whole file (no header, a multi-range or a malformed one, which RFC 9110 allows us to
 * ignore), 'unsatisfiable' for a range past the end (416), else the inclusive range clamped to the file.
 */
export function parseByteRange(header: string | null | undefined, size: number): ByteRange | 'unsatisfiable' | null {
  if (!header) return null
  const m = /^bytes=(\d*)-(\d*)$/.exec(header.trim())
  if (!m || (m[1] === '' && m[2] === '')) return null
  if (m[1] === '') {
    const suffix = Number(m[2])
    if (suffix === 0 || size === 0) return 'unsatisfiable'
    return { start: Math.max(0, size - suffix), end: size - 1 }
  }
  const start = Number(m[1])
  const end = m[2] === '' ? size - 1 : Math.min(Number(m[2]), size - 1)
  if (m[2] !== '' && Number(m[2]) < start) return null
  if (start >= size) return 'unsatisfiable'
  return { start, end }
}

/**
 * What the browser can tell before sending (the server decides again from the bytes): a message for a file that
 * is missing, empty, too big or clearly of another type by its name; null when it may go.
 */
export function precheckUpload(file: { name: string, size: number } | null | undefined, maxBytes: number, allowed: readonly AcceptedType[]): string | null {
  if (!file) return 'Choose a file to upload.'
  if (file.size === 0) return 'This file is empty. Choose the file again, or export it once more.'
  if (file.size > maxBytes) return `This file is ${formatBytes(file.size)}; the limit is ${formatBytes(maxBytes)}. Scan at a lower resolution or split it into parts.`
  const ext = file.name.includes('.') ? file.name.split('.').pop()!.toLowerCase() : ''
  const known = new Set(allowed.flatMap(t => (t.ext === 'jpg' ? ['jpg', 'jpeg'] : [t.ext])))
  if (ext && !known.has(ext)) return `Only ${describeTypes(allowed)} files can be uploaded.`
  return null
}
