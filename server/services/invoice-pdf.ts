// Invoice, credit note and receipt PDFs: our own plain A4 layout drawn with pdf-lib from the frozen record alone
// (shared/utils/invoice-document.ts), so an issued document prints the same every time. The font is embedded
// (Liberation Sans, SIL Open Font License, shipped in server/assets/fonts, through @pdf-lib/fontkit), so names like
// "Zoë Ångström-Łukasiewicz" and "€" print as written.
import { PDFDocument, rgb, type PDFFont, type PDFImage, type PDFPage } from 'pdf-lib'
import fontkit from '@pdf-lib/fontkit'
import { formatMoney } from '../../shared/utils/money'
import type { FrozenInvoice, FrozenParty } from '../../shared/utils/invoice-document'

export interface PdfAssets { fonts: { regular: Uint8Array, bold: Uint8Array }, logo?: { mime: string, bytes: Uint8Array } | null }

export interface ReceiptDocument {
  receiptNumber: string
  receivedOn: string
  method: string
  amountMinor: number
  paidToDateMinor: number
  balanceMinor: number
  invoice: FrozenInvoice
}

const A4 = { width: 595.28, height: 841.89 } // ISO 216 A4 in PDF points (210 × 297 mm, from memory)
const MARGIN = 48
const PINE = rgb(0.12, 0.3, 0.27)
const INK = rgb(0.11, 0.14, 0.13)
const SOFT = rgb(0.35, 0.4, 0.39)
const METHOD: Record<string, string> = { bank_transfer: 'Bank transfer', cash: 'Cash', card: 'Card' }

type TextOpts = { font?: PDFFont, size?: number, color?: ReturnType<typeof rgb>, right?: boolean }

/** A page cursor: text drawn top-down, a new page when the space runs out. */
class Writer {
  page: PDFPage
  y = A4.height - MARGIN
  private chars: Set<number>
  constructor(private doc: PDFDocument, readonly regular: PDFFont, readonly bold: PDFFont) {
    this.page = doc.addPage([A4.width, A4.height])
    this.chars = new Set(regular.getCharacterSet())
  }

  /** Spaces Intl uses become plain no-break spaces; a character the font lacks (rare) a '?', never a crash. */
  printable(s: string): string {
    return [...s.replace(/[\u202f\u2009]/g, '\u00a0')].map(c => (this.chars.has(c.codePointAt(0)!) ? c : '?')).join('')
  }

  text(s: string, x: number, o: TextOpts = {}) {
    const font = o.font ?? this.regular
    const size = o.size ?? 10
    const t = this.printable(s)
    const at = o.right ? x - font.widthOfTextAtSize(t, size) : x
    this.page.drawText(t, { x: at, y: this.y, size, font, color: o.color ?? INK })
  }

  /** Words of `s` in lines no wider than `width`. */
  wrap(s: string, width: number, o: TextOpts = {}): string[] {
    const font = o.font ?? this.regular
    const size = o.size ?? 10
    const lines: string[] = []
    let line = ''
    for (const word of this.printable(s).split(/\s+/)) {
      const next = line ? `${line} ${word}` : word
      if (font.widthOfTextAtSize(next, size) <= width || !line) line = next
      else { lines.push(line); line = word }
    }
    if (line) lines.push(line)
    return lines
  }

  down(gap = 14) {
    this.y -= gap
    if (this.y < MARGIN + 24) { this.page = this.doc.addPage([A4.width, A4.height]); this.y = A4.height - MARGIN }
  }

  rule(from = MARGIN) {
    this.page.drawLine({ start: { x: from, y: this.y }, end: { x: A4.width - MARGIN, y: this.y }, thickness: 0.5, color: SOFT })
  }
}

async function start(title: string, author: string, dated: string, assets: PdfAssets) {
  const doc = await PDFDocument.create()
  doc.registerFontkit(fontkit)
  doc.setTitle(title)
  doc.setAuthor(author)
  doc.setCreator('Forescent')
  doc.setProducer('Forescent')
  // Dated by the document, not by when it is drawn: the same record gives the same file.
  const day = new Date(`${dated}T00:00:00Z`)
  doc.setCreationDate(day)
  doc.setModificationDate(day)
  // subset: only the glyphs used are embedded, which keeps a one-page invoice small.
  const regular = await doc.embedFont(assets.fonts.regular, { subset: true })
  const bold = await doc.embedFont(assets.fonts.bold, { subset: true })
  let logo: PDFImage | null = null
  if (assets.logo) logo = assets.logo.mime === 'image/png' ? await doc.embedPng(assets.logo.bytes) : await doc.embedJpg(assets.logo.bytes)
  return { doc, w: new Writer(doc, regular, bold), logo }
}

function countryName(code: string, locale: string): string {
  if (!code) return ''
  try { return new Intl.DisplayNames([locale], { type: 'region' }).of(code) ?? code }
  catch { return code }
}

/** The seller's block (left) with the logo above it; returns the y where it ended. */
function sellerBlock(w: Writer, inv: FrozenInvoice, logo: PDFImage | null) {
  if (logo) {
    const scale = Math.min(56 / logo.height, 160 / logo.width, 1)
    w.page.drawImage(logo, { x: MARGIN, y: w.y - logo.height * scale + 12, width: logo.width * scale, height: logo.height * scale })
    w.y -= logo.height * scale + 6
  }
  const s = inv.seller
  w.text(s.tradingName || s.name, MARGIN, { font: w.bold, size: 15, color: PINE })
  w.y -= 16
  if (s.tradingName && s.tradingName !== s.name) { w.text(s.name, MARGIN, { color: SOFT }); w.y -= 12 }
  partyLines(w, s, inv.locale, MARGIN)
  if (s.vatNumber) { w.text(`VAT number: ${s.vatNumber}`, MARGIN); w.y -= 12 }
  if (s.companyNumber) { w.text(`Company number: ${s.companyNumber}`, MARGIN); w.y -= 12 }
  const contact = [s.email, s.phone].filter(Boolean).join(' · ')
  if (contact) { w.text(contact, MARGIN, { color: SOFT }); w.y -= 12 }
}

function partyLines(w: Writer, p: FrozenParty, locale: string, x: number) {
  for (const line of [...p.address, countryName(p.country, locale)].filter(Boolean)) { w.text(line, x); w.y -= 12 }
}

/** An invoice or credit note, exactly as frozen at issue. */
export async function renderInvoicePdf(inv: FrozenInvoice, assets: PdfAssets): Promise<Uint8Array> {
  const isCredit = inv.kind === 'credit_note'
  const title = `${isCredit ? 'Credit note' : 'Invoice'} ${inv.number}`
  const { doc, w, logo } = await start(title, inv.seller.name, inv.issueDate, assets)
  const money = (m: number) => formatMoney(m, inv.currency, inv.locale)
  const right = A4.width - MARGIN

  // Heading block on the right: what it is, its number and dates.
  const top = w.y
  w.text(isCredit ? 'CREDIT NOTE' : 'INVOICE', right, { font: w.bold, size: 16, right: true })
  w.y -= 18
  w.text(`Number: ${inv.number}`, right, { font: w.bold, right: true }); w.y -= 13
  w.text(`Date of issue: ${inv.issueDate}`, right, { right: true }); w.y -= 13
  if (!isCredit && inv.dueDate) { w.text(`Due date: ${inv.dueDate}`, right, { right: true }); w.y -= 13 }
  if (inv.corrects) { w.text(`Corrects invoice ${inv.corrects.number}${inv.corrects.issueDate ? ` of ${inv.corrects.issueDate}` : ''}`, right, { right: true }); w.y -= 13 }
  const headingEnd = w.y
  w.y = top
  sellerBlock(w, inv, logo)
  w.y = Math.min(w.y, headingEnd) - 16

  w.text(isCredit ? 'Credited to' : 'Billed to', MARGIN, { color: SOFT }); w.y -= 13
  w.text(inv.buyer.name, MARGIN, { font: w.bold }); w.y -= 13
  partyLines(w, inv.buyer, inv.locale, MARGIN)
  if (inv.buyer.vatNumber) { w.text(`VAT number: ${inv.buyer.vatNumber}`, MARGIN); w.y -= 12 }
  w.down(16)

  const cols = { item: MARGIN, qty: 300, unit: 370, rate: 420, net: 485, tax: right }
  const head = (label: string, x: number, r = true) => w.text(label, x, { font: w.bold, color: SOFT, right: r, size: 9 })
  head('Description', cols.item, false); head('Qty', cols.qty); head('Unit price', cols.unit); head('VAT rate', cols.rate); head('Net', cols.net); head('VAT', cols.tax)
  w.down(6); w.rule(); w.down(13)
  const pct = (bp: number) => `${(bp / 100).toLocaleString(inv.locale)} %`
  for (const l of inv.lines) {
    const desc = w.wrap(l.description, cols.qty - cols.item - 30)
    w.text(desc[0] ?? '', cols.item)
    w.text(String(l.quantity), cols.qty, { right: true })
    w.text(money(l.unitMinor), cols.unit, { right: true, size: 9 })
    w.text(pct(l.taxRateBasisPoints), cols.rate, { right: true, size: 9 })
    w.text(money(l.netMinor), cols.net, { right: true, size: 9 })
    w.text(money(l.taxMinor), cols.tax, { right: true, size: 9 })
    for (const more of desc.slice(1)) { w.down(12); w.text(more, cols.item) }
    w.down(15)
  }
  w.y += 6; w.rule(300); w.down(12)
  for (const r of inv.totals.byRate) {
    w.text(`VAT at ${pct(r.rateBasisPoints)} on ${money(r.netMinor)}`, cols.net, { right: true, color: SOFT })
    w.text(money(r.taxMinor), cols.tax, { right: true })
    w.down(13)
  }
  for (const [label, value, strong] of [['Total net', inv.totals.netMinor, false], ['Total VAT', inv.totals.taxMinor, false], [isCredit ? 'Total credited' : 'Total to pay', inv.totals.grossMinor, true]] as const) {
    w.text(label, cols.net, { right: true, font: strong ? w.bold : w.regular })
    w.text(money(value), cols.tax, { right: true, font: strong ? w.bold : w.regular })
    w.down(14)
  }
  w.down(10)

  if (!isCredit) {
    w.text('How to pay', MARGIN, { font: w.bold }); w.down(13)
    const p = inv.payment
    const payLines = [
      p.terms,
      inv.dueDate ? `Please pay by ${inv.dueDate}, quoting the payment reference ${p.reference}.` : `Payment reference: ${p.reference}`,
      p.iban ? `IBAN: ${p.iban.replace(/(.{4})(?=.)/g, '$1 ')}` : '',
      p.bic ? `BIC: ${p.bic}` : '',
      p.bankAccountText ? `Bank account: ${p.bankAccountText}` : '',
      `Account name: ${inv.seller.name}`,
    ].filter(Boolean)
    for (const line of payLines) for (const part of w.wrap(line, right - MARGIN)) { w.text(part, MARGIN); w.down(13) }
  }
  if (inv.notes) { w.down(6); for (const part of w.wrap(inv.notes, right - MARGIN)) { w.text(part, MARGIN, { color: SOFT }); w.down(13) } }
  if (inv.footer) {
    w.down(8)
    for (const part of w.wrap(inv.footer, right - MARGIN, { size: 8 })) { w.text(part, MARGIN, { size: 8, color: SOFT }); w.down(11) }
  }
  return doc.save()
}

/** A receipt for one payment: who paid whom, for which invoice and its lines, how much and how, what is left. */
export async function renderReceiptPdf(r: ReceiptDocument, assets: PdfAssets): Promise<Uint8Array> {
  const inv = r.invoice
  const { doc, w, logo } = await start(`Receipt ${r.receiptNumber}`, inv.seller.name, r.receivedOn, assets)
  const money = (m: number) => formatMoney(m, inv.currency, inv.locale)
  const right = A4.width - MARGIN
  const top = w.y
  w.text('RECEIPT', right, { font: w.bold, size: 16, right: true }); w.y -= 18
  w.text(`Receipt number: ${r.receiptNumber}`, right, { font: w.bold, right: true }); w.y -= 13
  w.text(`Received on: ${r.receivedOn}`, right, { right: true }); w.y -= 13
  w.text(`For invoice ${inv.number} of ${inv.issueDate}`, right, { right: true }); w.y -= 13
  const headingEnd = w.y
  w.y = top
  sellerBlock(w, inv, logo)
  w.y = Math.min(w.y, headingEnd) - 16
  w.text('Received from', MARGIN, { color: SOFT }); w.y -= 13
  w.text(inv.buyer.name, MARGIN, { font: w.bold }); w.y -= 13
  partyLines(w, inv.buyer, inv.locale, MARGIN)
  w.down(16)
  w.text(`Amount received: ${money(r.amountMinor)} (${METHOD[r.method] ?? r.method})`, MARGIN, { font: w.bold, size: 12 }); w.down(20)
  w.text(`Invoice ${inv.number}`, MARGIN, { font: w.bold, color: SOFT, size: 9 }); w.down(6); w.rule(); w.down(13)
  for (const l of inv.lines) {
    const desc = w.wrap(`${l.quantity} × ${l.description}`, 380)
    w.text(desc[0] ?? '', MARGIN)
    w.text(money(l.grossMinor), right, { right: true })
    for (const more of desc.slice(1)) { w.down(12); w.text(more, MARGIN) }
    w.down(14)
  }
  w.y += 6; w.rule(300); w.down(12)
  for (const [label, value] of [['Invoice total', inv.totals.grossMinor], ['Paid to date', r.paidToDateMinor], ['Still to pay', r.balanceMinor]] as const) {
    w.text(label, 420, { right: true }); w.text(money(value), right, { right: true }); w.down(14)
  }
  w.down(10)
  w.text(r.balanceMinor > 0 ? 'Thank you for your payment.' : 'Thank you: this invoice is paid in full.', MARGIN); w.down(14)
  if (inv.footer) for (const part of w.wrap(inv.footer, right - MARGIN, { size: 8 })) { w.text(part, MARGIN, { size: 8, color: SOFT }); w.down(11) }
  return doc.save()
}
