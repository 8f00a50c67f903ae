// Small real files built from bytes for upload tests.
import { deflateSync } from 'node:zlib'

/**
 * A minimal valid one-page PDF with the given text (structure per ISO 32000-1: header, objects, cross-reference
 * table with byte offsets, trailer; from memory).
 */
export function minimalPdf(text: string): Uint8Array<ArrayBuffer> {
  const safe = text.replace(/[\\()]/g, c => `\\${c}`).replace(/[^\x20-\x7e]/g, '?')
  const content = `BT /F1 12 Tf 72 720 Td (${safe}) Tj ET`
  const objects = [
    '<< /Type /Catalog /Pages 2 0 R >>',
    '<< /Type /Pages /Kids [3 0 R] /Count 1 >>',
    '<< /Type /Page /Parent 2 0 R /MediaBox [0 0 612 792] /Contents 4 0 R /Resources << /Font << /F1 5 0 R >> >> >>',
    `<< /Length ${content.length} >>\nstream\n${content}\nendstream`,
    '<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>',
  ]
  let out = '%PDF-1.4\n'
  const offsets: number[] = []
  objects.forEach((o, i) => { offsets.push(out.length); out += `${i + 1} 0 obj\n${o}\nendobj\n` })
  const xref = out.length
  out += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n${offsets.map(n => `${String(n).padStart(10, '0')} 00000 n \n`).join('')}`
  out += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`
  return new Uint8Array(new TextEncoder().encode(out))
}

const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xEDB88320 ^ (c >>> 1) : c >>> 1
  return c >>> 0
})
function crc32(bytes: Uint8Array): number {
  let c = 0xFFFFFFFF
  for (const b of bytes) c = CRC_TABLE[(c ^ b) & 0xFF]! ^ (c >>> 8)
  return (c ^ 0xFFFFFFFF) >>> 0
}
function chunk(type: string, data: Uint8Array): Buffer {
  const head = Buffer.alloc(8)
  head.writeUInt32BE(data.length, 0)
  head.write(type, 4, 'latin1')
  const crc = Buffer.alloc(4)
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])), 0)
  return Buffer.concat([head, data, crc])
}

/**
 * A real PNG (signature, IHDR, IDAT, IEND; PNG specification, W3C 2003, from memory): `size`×`size` pixels of a
 * simple two-colour pattern, 8-bit RGB.
 */
export function tinyPng(size = 4): Uint8Array<ArrayBuffer> {
  const ihdr = Buffer.alloc(13)
  ihdr.writeUInt32BE(size, 0)
  ihdr.writeUInt32BE(size, 4)
  ihdr[8] = 8 // bit depth
  ihdr[9] = 2 // colour type: RGB
  const rows: number[] = []
  for (let y = 0; y < size; y++) {
    rows.push(0) // filter: none
    for (let x = 0; x < size; x++) {
      const light = ((x >> 2) + (y >> 2)) % 2 === 0
      rows.push(...(light ? [0xD5, 0xE9, 0xE4] : [0x34, 0x7A, 0x6A]))
    }
  }
  const signature = Buffer.from([0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A])
  return new Uint8Array(Buffer.concat([signature, chunk('IHDR', ihdr), chunk('IDAT', deflateSync(Buffer.from(rows))), chunk('IEND', new Uint8Array(0))]))
}

/** The start of a HEIC file: an ISO base media `ftyp` box with major brand "heic" (ISO/IEC 23008-12, from memory). */
export function tinyHeic(): Uint8Array<ArrayBuffer> {
  const box = Buffer.alloc(24)
  box.writeUInt32BE(24, 0)
  box.write('ftypheic', 4, 'latin1')
  box.writeUInt32BE(0, 12)
  box.write('mif1heic', 16, 'latin1')
  return new Uint8Array(Buffer.concat([box, Buffer.alloc(32)]))
}
