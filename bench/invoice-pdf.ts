// How long drawing an invoice PDF takes and how large it is (embedded, subset Liberation Sans): a one-page invoice
// and a 60-line one, rendered 30 times each after a warm-up. Run: npx tsx bench/invoice-pdf.ts
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { renderInvoicePdf } from '../server/services/invoice-pdf'
import { freezeInvoice, type FrozenLine } from '../shared/utils/invoice-document'

const dir = resolve(import.meta.dirname, '../server/assets/fonts')
const fonts = { regular: readFileSync(`${dir}/LiberationSans-Regular.ttf`), bold: readFileSync(`${dir}/LiberationSans-Bold.ttf`) }
const line: FrozenLine = { description: 'Extra home visit', quantity: 1, unitMinor: 8500, taxRateBasisPoints: 2000, netMinor: 8500, taxMinor: 1700, grossMinor: 10200 }
const doc = (lines: FrozenLine[]) => freezeInvoice({
  kind: 'invoice', number: 'INV-2026-0007', issueDate: '2026-11-02', dueDate: '2026-11-16', currency: 'GBP', locale: 'en-GB',
  seller: { name: 'Invented Scent Dogs Ltd', address: ['4 Orchard Yard', 'Ashcombe'], country: 'GB', vatNumber: 'GB 000 1111 22', logoId: null },
  buyer: { name: 'Zoë Ångström-Łukasiewicz', address: ['3 Invented Lane'], country: 'GB' },
  lines, payment: { terms: 'Payment within 14 days.', iban: 'GB82WEST12345698765432', bic: 'LARKGB21', bankAccountText: '', reference: 'INV-2026-0007' },
  footer: 'Thank you.', notes: null, corrects: null,
})
for (const [label, d] of [['1 line', doc([line])], ['60 lines', doc(Array.from({ length: 60 }, () => line))]] as const) {
  await renderInvoicePdf(d, { fonts })
  const times: number[] = []
  let size = 0
  for (let i = 0; i < 30; i++) {
    const t0 = performance.now()
    size = (await renderInvoicePdf(d, { fonts })).length
    times.push(performance.now() - t0)
  }
  times.sort((a, b) => a - b)
  console.log(`${label}: ${size} bytes, p50 ${times[14]!.toFixed(1)} ms, p95 ${times[28]!.toFixed(1)} ms`)
}
