import { describe, expect, it } from 'vitest'
import {
  acceptedType, contentDisposition, describeTypes, DOCUMENT_KIND_LABELS, DOCUMENT_KINDS, DOCUMENT_MAX_BYTES,
  DOCUMENT_TYPES, DOG_PHOTO_MAX_BYTES, DOG_PHOTO_TYPES, encodeRfc5987, formatBytes, parseByteRange, precheckUpload,
  safeDownloadName, titleFromFileName,
} from '../../shared/utils/documents'
import { documentPatchSchema, documentUploadSchema } from '../../shared/schemas/documents'

describe('accepted types and limits', () => {
  it('keeps PDF, JPEG, PNG and HEIC documents and refuses everything else', () => {
    expect(acceptedType('application/pdf', DOCUMENT_TYPES)?.ext).toBe('pdf')
    expect(acceptedType('image/jpeg', DOCUMENT_TYPES)?.ext).toBe('jpg')
    expect(acceptedType('image/png', DOCUMENT_TYPES)?.ext).toBe('png')
    expect(acceptedType('image/heic', DOCUMENT_TYPES)?.ext).toBe('heic')
    expect(acceptedType('image/heif', DOCUMENT_TYPES)?.ext).toBe('heif')
    for (const other of ['text/plain', 'application/zip', 'image/gif', 'image/svg+xml', 'text/html', 'video/mp4', '', undefined, null]) {
      expect(acceptedType(other, DOCUMENT_TYPES)).toBeNull()
    }
  })

  it('keeps only images as dog photos', () => {
    expect(acceptedType('application/pdf', DOG_PHOTO_TYPES)).toBeNull()
    expect(acceptedType('image/png', DOG_PHOTO_TYPES)?.label).toBe('PNG')
  })

  it('shows PDF, JPEG and PNG inline but always downloads HEIC', () => {
    expect(DOCUMENT_TYPES.filter(t => t.inline).map(t => t.label)).toEqual(['PDF', 'JPEG', 'PNG'])
  })

  it('names the accepted types once each, in plain words', () => {
    expect(describeTypes(DOCUMENT_TYPES)).toBe('PDF, JPEG, PNG or HEIC')
    expect(describeTypes(DOG_PHOTO_TYPES)).toBe('JPEG, PNG or HEIC')
  })

  it('sets the limits we chose: 15 MB for a document, 8 MB for a photo (binary megabytes)', () => {
    expect(DOCUMENT_MAX_BYTES).toBe(15_728_640) // 15 × 1 048 576
    expect(DOG_PHOTO_MAX_BYTES).toBe(8_388_608) // 8 × 1 048 576
  })

  it('has a label for every kind', () => {
    expect(Object.keys(DOCUMENT_KIND_LABELS).sort()).toEqual([...DOCUMENT_KINDS].sort())
    expect(DOCUMENT_KIND_LABELS['vaccination-record']).toBe('Vaccination record')
  })
})

describe('formatBytes', () => {
  it('uses binary units with at most one decimal', () => {
    expect(formatBytes(0)).toBe('0 bytes')
    expect(formatBytes(1)).toBe('1 byte')
    expect(formatBytes(1023)).toBe('1023 bytes')
    expect(formatBytes(1024)).toBe('1 KB')
    expect(formatBytes(1536)).toBe('2 KB') // 1.5 KB rounds to 2
    expect(formatBytes(1024 * 1024)).toBe('1 MB')
    expect(formatBytes(3.45 * 1024 * 1024)).toBe('3.5 MB')
    expect(formatBytes(15 * 1024 * 1024)).toBe('15 MB')
    expect(formatBytes(-1)).toBe('—')
  })
})

describe('titleFromFileName', () => {
  it('drops folders and the extension', () => {
    expect(titleFromFileName('Vaccination record 2026.pdf')).toBe('Vaccination record 2026')
    expect(titleFromFileName('C:\\scans\\letter.from.clinic.PDF')).toBe('letter.from.clinic')
    expect(titleFromFileName('/home/ada/consent.jpeg')).toBe('consent')
  })
  it('keeps a name without extension and falls back when nothing is left', () => {
    expect(titleFromFileName('README')).toBe('README')
    expect(titleFromFileName('.pdf')).toBe('.pdf')
    expect(titleFromFileName('   ')).toBe('Untitled document')
    expect(titleFromFileName('\u0000\u0001.png')).toBe('Untitled document')
  })
  it('caps the title at 200 characters', () => {
    expect(titleFromFileName(`${'a'.repeat(300)}.pdf`)).toHaveLength(200)
  })
})

describe('safeDownloadName', () => {
  it('keeps letters of any language and adds the stored type\'s extension', () => {
    expect(safeDownloadName('Brief für Jürgen', 'pdf')).toEqual({ name: 'Brief für Jürgen.pdf', ascii: 'Brief fur Jurgen.pdf' })
  })
  it('removes path separators, reserved characters and leading dots', () => {
    expect(safeDownloadName('../../etc/passwd', 'pdf').name).toBe('etc_passwd.pdf')
    expect(safeDownloadName('a<b>c:d|e?f*g\\h', 'png').name).toBe('a_b_c_d_e_f_g_h.png')
    expect(safeDownloadName('line\nbreak\ttab', 'pdf').name).toBe('line_break_tab.pdf')
    expect(safeDownloadName('...hidden', 'pdf').name).toBe('hidden.pdf')
  })
  it('turns double quotes into apostrophes and spells letters without an ASCII form', () => {
    expect(safeDownloadName('Letter "Dr Weiß" – Ørsted', 'pdf')).toEqual({
      name: 'Letter \'Dr Weiß\' – Ørsted.pdf',
      ascii: 'Letter \'Dr Weiss\' - Orsted.pdf',
    })
    expect(safeDownloadName('心电图', 'pdf').ascii).toBe('___.pdf')
  })
  it('does not double the extension and never returns an empty name', () => {
    expect(safeDownloadName('scan.PDF', 'pdf').name).toBe('scan.pdf')
    expect(safeDownloadName('', 'pdf')).toEqual({ name: 'document.pdf', ascii: 'document.pdf' })
    expect(safeDownloadName('///', 'jpg').name).toBe('document.jpg')
  })
  it('caps the name at 150 characters before the extension', () => {
    expect(safeDownloadName('x'.repeat(400), 'pdf').name).toHaveLength(154)
  })
})

describe('Content-Disposition', () => {
  it('percent-encodes UTF-8 and every character outside RFC 5987 attr-char', () => {
    // UTF-8 of "ü" is C3 BC and of "ß" C3 9F (Unicode code charts, from memory); "'" is %27, space %20.
    expect(encodeRfc5987('Jürgen\'s Weiß (1).pdf')).toBe('J%C3%BCrgen%27s%20Wei%C3%9F%20%281%29.pdf')
    expect(encodeRfc5987('a*b!c~d')).toBe('a%2Ab!c~d')
  })
  it('sends an ASCII fallback and the UTF-8 name (RFC 6266 section 4.3)', () => {
    expect(contentDisposition('attachment', 'Brief "Jö"', 'pdf'))
      .toBe('attachment; filename="Brief \'Jo\'.pdf"; filename*=UTF-8\'\'Brief%20%27J%C3%B6%27.pdf')
    expect(contentDisposition('inline', 'x', 'png')).toMatch(/^inline; filename="x.png"; /)
  })
})

describe('parseByteRange', () => {
  it('reads one range, an open end and a suffix (RFC 9110 section 14.1.2)', () => {
    expect(parseByteRange('bytes=0-99', 1000)).toEqual({ start: 0, end: 99 })
    expect(parseByteRange('bytes=900-', 1000)).toEqual({ start: 900, end: 999 })
    expect(parseByteRange('bytes=-100', 1000)).toEqual({ start: 900, end: 999 })
    expect(parseByteRange('bytes=-5000', 1000)).toEqual({ start: 0, end: 999 })
    expect(parseByteRange('bytes=990-5000', 1000)).toEqual({ start: 990, end: 999 })
  })
  it('ignores what it does not serve and refuses a start past the end', () => {
    expect(parseByteRange(undefined, 1000)).toBeNull()
    expect(parseByteRange('bytes=0-1,5-6', 1000)).toBeNull()
    expect(parseByteRange('items=0-1', 1000)).toBeNull()
    expect(parseByteRange('bytes=50-10', 1000)).toBeNull()
    expect(parseByteRange('bytes=-', 1000)).toBeNull()
    expect(parseByteRange('bytes=1000-', 1000)).toBe('unsatisfiable')
    expect(parseByteRange('bytes=-0', 1000)).toBe('unsatisfiable')
  })
})

describe('precheckUpload', () => {
  it('asks for a file, refuses empty and oversize files and clearly foreign names', () => {
    expect(precheckUpload(null, DOCUMENT_MAX_BYTES, DOCUMENT_TYPES)).toBe('Choose a file to upload.')
    expect(precheckUpload({ name: 'a.pdf', size: 0 }, DOCUMENT_MAX_BYTES, DOCUMENT_TYPES)).toMatch(/empty/)
    expect(precheckUpload({ name: 'a.pdf', size: DOCUMENT_MAX_BYTES + 1 }, DOCUMENT_MAX_BYTES, DOCUMENT_TYPES)).toMatch(/limit is 15 MB/)
    expect(precheckUpload({ name: 'notes.docx', size: 10 }, DOCUMENT_MAX_BYTES, DOCUMENT_TYPES)).toBe('Only PDF, JPEG, PNG or HEIC files can be uploaded.')
    expect(precheckUpload({ name: 'letter.pdf', size: DOCUMENT_MAX_BYTES }, DOCUMENT_MAX_BYTES, DOCUMENT_TYPES)).toBeNull()
    expect(precheckUpload({ name: 'IMG_0001.JPEG', size: 10 }, DOCUMENT_MAX_BYTES, DOCUMENT_TYPES)).toBeNull()
    expect(precheckUpload({ name: 'scan', size: 10 }, DOCUMENT_MAX_BYTES, DOCUMENT_TYPES)).toBeNull()
    expect(precheckUpload({ name: 'letter.pdf', size: 10 }, DOG_PHOTO_MAX_BYTES, DOG_PHOTO_TYPES)).toMatch(/Only JPEG, PNG or HEIC/)
  })
})

describe('document schemas', () => {
  it('needs a kind and treats an empty title as none', () => {
    expect(documentUploadSchema.safeParse({ title: 'x' }).success).toBe(false)
    expect(documentUploadSchema.parse({ kind: 'consent', title: '  ' })).toEqual({ kind: 'consent', title: undefined })
    expect(documentUploadSchema.safeParse({ kind: 'passport' }).success).toBe(false)
  })
  it('needs something to change and a non-empty title', () => {
    expect(documentPatchSchema.safeParse({}).success).toBe(false)
    expect(documentPatchSchema.safeParse({ title: ' ' }).success).toBe(false)
    expect(documentPatchSchema.parse({ title: ' New name ' })).toEqual({ title: 'New name' })
    expect(documentPatchSchema.parse({ kind: 'insurance' })).toEqual({ kind: 'insurance' })
  })
})
