// The invoice PDF: our own plain A4 layout drawn with pdf-lib (standard Helvetica, so nothing to load from disk).
import { PDFDocument, StandardFonts, rgb, type PDFFont, type PDFPage } from 'pdf-lib'
import { formatMoney } from '../../shared/utils/money'

export interface InvoicePdfInput {
  kind: 'invoice' | 'credit_note'
  number: string | null
  state: string
  currency: string
  issueDate: string | null
  dueDate: string | null
  householdName?: string
  personName: string
  netMinor: number
  taxMinor: number
  grossMinor: number
  balanceMinor: number
  notes: string | null
  lines: Array<{ description: string, quantity: number, unitMinor: number, taxRateBasisPoints: number, taxMinor: number, grossMinor: number }>
  payments: Array<{ receivedOn: string, method: string, amountMinor: number }>
  business: { name: string, locale: string, taxNumber: string, footer: string }
}

const A4 = { width: 595.28, height: 841.89 } // ISO 216 A4 in PDF points (210 × 297 mm, from memory)
const PINE = rgb(0.12, 0.3, 0.27)
const INK = rgb(0.11, 0.14, 0.13)
const SOFT = rgb(0.35, 0.4, 0.39)

/** Standard fonts speak WinAnsi only: spaces Intl uses become plain spaces, anything else unprintable a '?'. */
function printable(text: string): string {
  return text.replace(/[\u00a0\u202f\u2009]/g, ' ').replace(/[\u2013\u2014]/g, '-').replace(/[^\x20-\x7e\u00a0-\u00ff€£]/g, '?')
}

export async function renderInvoicePdf(inv: InvoicePdfInput): Promise<Uint8Array> {
  const doc = await PDFDocument.create()
  const title = `${inv.kind === 'credit_note' ? 'Credit note' : 'Invoice'} ${inv.number ?? '(draft)'}`
  doc.setTitle(title)
  doc.setAuthor(inv.business.name)
  doc.setCreator('Forescent')
  const regular = await doc.embedFont(StandardFonts.Helvetica)
  const bold = await doc.embedFont(StandardFonts.HelveticaBold)
  const money = (m: number) => printable(formatMoney(m, inv.currency, inv.business.locale))
  let page: PDFPage = doc.addPage([A4.width, A4.height])
  let y = A4.height - 56
  const text = (s: string, x: number, opts: { font?: PDFFont, size?: number, color?: ReturnType<typeof rgb>, right?: boolean } = {}) => {
    const font = opts.font ?? regular
    const size = opts.size ?? 10
    const t = printable(s)
    const at = opts.right ? x - font.widthOfTextAtSize(t, size) : x
    page.drawText(t, { x: at, y, size, font, color: opts.color ?? INK })
  }
  const next = (gap = 14) => {
    y -= gap
    if (y < 72) { page = doc.addPage([A4.width, A4.height]); y = A4.height - 56 }
  }

  text(inv.business.name, 48, { font: bold, size: 16, color: PINE })
  text(inv.kind === 'credit_note' ? 'CREDIT NOTE' : 'INVOICE', A4.width - 48, { font: bold, size: 16, right: true })
  next(18)
  if (inv.business.taxNumber) text(`Tax number: ${inv.business.taxNumber}`, 48, { color: SOFT })
  text(inv.number ?? 'Draft - not yet issued', A4.width - 48, { font: bold, right: true })
  next(28)
  text('Billed to', 48, { color: SOFT })
  text(`Issued: ${inv.issueDate ?? '-'}`, A4.width - 48, { right: true })
  next()
  text(inv.householdName ?? '', 48, { font: bold })
  text(`${inv.kind === 'credit_note' ? 'Dated' : 'Due'}: ${inv.dueDate ?? '-'}`, A4.width - 48, { right: true })
  next()
  text(inv.personName, 48)
  text(`Status: ${inv.state}`, A4.width - 48, { right: true })
  next(32)

  const cols = { item: 48, qty: 330, unit: 400, tax: 470, amount: A4.width - 48 }
  text('Item', cols.item, { font: bold, color: SOFT }); text('Qty', cols.qty, { font: bold, color: SOFT, right: true })
  text('Unit', cols.unit, { font: bold, color: SOFT, right: true }); text('Tax', cols.tax, { font: bold, color: SOFT, right: true })
  text('Amount', cols.amount, { font: bold, color: SOFT, right: true })
  next(6)
  page.drawLine({ start: { x: 48, y }, end: { x: A4.width - 48, y }, thickness: 0.5, color: SOFT })
  next(14)
  for (const l of inv.lines) {
    const pct = (l.taxRateBasisPoints / 100).toLocaleString(inv.business.locale)
    text(l.description.length > 48 ? `${l.description.slice(0, 45)}...` : l.description, cols.item)
    text(String(l.quantity), cols.qty, { right: true })
    text(money(l.unitMinor), cols.unit, { right: true })
    text(`${money(l.taxMinor)} (${pct}%)`, cols.tax, { right: true, size: 9 })
    text(money(l.grossMinor), cols.amount, { right: true })
    next(16)
  }
  page.drawLine({ start: { x: 300, y: y + 8 }, end: { x: A4.width - 48, y: y + 8 }, thickness: 0.5, color: SOFT })
  next(4)
  for (const [label, value, strong] of [['Net', inv.netMinor, false], ['Tax', inv.taxMinor, false], ['Total', inv.grossMinor, true]] as const) {
    text(label, cols.tax, { right: true, font: strong ? bold : regular })
    text(money(value), cols.amount, { right: true, font: strong ? bold : regular })
    next()
  }
  if (inv.kind === 'invoice' && inv.state !== 'draft') {
    text('Still to pay', cols.tax, { right: true, font: bold }); text(money(inv.balanceMinor), cols.amount, { right: true, font: bold })
    next()
  }
  if (inv.payments.length) {
    next(14)
    text('Payments received', 48, { font: bold })
    next()
    const METHOD: Record<string, string> = { bank_transfer: 'Bank transfer', cash: 'Cash', card: 'Card' }
    for (const p of inv.payments) { text(`${p.receivedOn}  ${METHOD[p.method] ?? p.method}  ${money(p.amountMinor)}`, 48); next() }
  }
  if (inv.notes) { next(10); text(inv.notes.slice(0, 110), 48, { color: SOFT }); next() }
  if (inv.business.footer) { y = Math.min(y, 60); text(inv.business.footer.slice(0, 110), 48, { size: 8, color: SOFT }) }
  return doc.save()
}
