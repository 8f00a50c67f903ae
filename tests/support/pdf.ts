// Reading our PDFs back with an independent library (Mozilla's PDF.js, pdfjs-dist): the text a person would see,
// and a page drawn to PNG (through @napi-rs/canvas, which PDF.js uses in Node) to look at.
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs'

async function open(bytes: Uint8Array) {
  return getDocument({ data: new Uint8Array(bytes), useSystemFonts: false, disableFontFace: true, verbosity: 0 }).promise
}

/** The text of every page, each line as PDF.js finds it, joined by newlines. */
export async function pdfText(bytes: Uint8Array): Promise<string> {
  const doc = await open(bytes)
  const pages: string[] = []
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent()
    const lines = new Map<number, Array<{ x: number, s: string }>>()
    for (const item of content.items) {
      if (!('str' in item)) continue
      const y = Math.round(item.transform[5])
      lines.set(y, [...(lines.get(y) ?? []), { x: item.transform[4], s: item.str }])
    }
    pages.push([...lines.entries()].sort((a, b) => b[0] - a[0]).map(([, parts]) => parts.sort((a, b) => a.x - b.x).map(p => p.s).join('  ')).join('\n'))
  }
  await doc.destroy()
  return pages.join('\n')
}

/** Page `n` (from 1) drawn at `scale` to PNG bytes. */
export async function pdfPagePng(bytes: Uint8Array, n = 1, scale = 1.5): Promise<Buffer> {
  const { createCanvas } = await import('@napi-rs/canvas')
  const doc = await open(bytes)
  const page = await doc.getPage(n)
  const viewport = page.getViewport({ scale })
  const canvas = createCanvas(Math.ceil(viewport.width), Math.ceil(viewport.height))
  const ctx = canvas.getContext('2d')
  ctx.fillStyle = '#ffffff'
  ctx.fillRect(0, 0, canvas.width, canvas.height)
  await page.render({ canvasContext: ctx as never, canvas: canvas as never, viewport }).promise
  await doc.destroy()
  return canvas.toBuffer('image/png')
}
