// The invoice, credit note and receipt PDFs, read back with an independent library (PDF.js): every field an invoice
// must carry is in the text, each check marked with its source (Council Directive 2006/112/EC art. 226, or common
// practice); names outside Latin-1 and "€" print as written (the font is embedded); long documents continue.
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { PDFDocument } from 'pdf-lib'
import { describe, expect, it } from 'vitest'
import { renderInvoicePdf, renderReceiptPdf } from '../../server/services/invoice-pdf'
import { freezeInvoice, type FreezeInput } from '../../shared/utils/invoice-document'
import { pdfText } from '../support/pdf'

const fontDir = resolve(import.meta.dirname, '../../server/assets/fonts')
const assets = { fonts: { regular: readFileSync(`${fontDir}/LiberationSans-Regular.ttf`), bold: readFileSync(`${fontDir}/LiberationSans-Bold.ttf`) } }

// An invented seller and buyer.
const input: FreezeInput = {
  kind: 'invoice', number: 'INV-2026-0007', issueDate: '2026-11-02', dueDate: '2026-11-16', currency: 'EUR', locale: 'en-GB',
  seller: { name: 'Invented Scent Dogs Ltd', tradingName: 'Invented Scent Dogs', address: ['4 Orchard Yard', 'Ashcombe', 'AC4 9LR'], country: 'GB', vatNumber: 'GB 000 1111 22', companyNumber: '00011122', logoId: null },
  buyer: { name: 'Zoë Ångström-Łukasiewicz', address: ['3 Rue des Lilas', '69001 Lyon'], country: 'FR' },
  lines: [
    { description: 'Home training visit', quantity: 2, unitMinor: 8500, taxRateBasisPoints: 2000, netMinor: 17000, taxMinor: 3400, grossMinor: 20400 },
    { description: 'Scent-sample kit', quantity: 1, unitMinor: 1000, taxRateBasisPoints: 550, netMinor: 1000, taxMinor: 55, grossMinor: 1055 },
  ],
  payment: { terms: 'Payment within 14 days of the date of issue.', iban: 'GB82WEST12345698765432', bic: 'LARKGB21', bankAccountText: 'Sort code 00-11-22, account 00011122', reference: 'INV-2026-0007' },
  footer: 'Thank you.', notes: null, corrects: null,
}

describe('the invoice PDF', () => {
  it('carries every required field, read back by PDF.js', async () => {
    const text = await pdfText(await renderInvoicePdf(freezeInvoice(input), assets))
    const required: Array<[string, string]> = [
      ['Date of issue: 2026-11-02', 'art. 226(1): the date of issue'],
      ['Number: INV-2026-0007', 'art. 226(2): a sequential number identifying the invoice'],
      ['VAT number: GB 000 1111 22', 'art. 226(3): the supplier\'s VAT identification number'],
      ['Invented Scent Dogs Ltd', 'art. 226(5): the supplier\'s full name'],
      ['4 Orchard Yard', 'art. 226(5): the supplier\'s address'],
      ['Zoë Ångström-Łukasiewicz', 'art. 226(5): the customer\'s full name'],
      ['3 Rue des Lilas', 'art. 226(5): the customer\'s address'],
      ['Home training visit', 'art. 226(6): the extent and nature of the services'],
      ['€85.00', 'art. 226(8): the unit price exclusive of VAT'],
      ['20 %', 'art. 226(9): the VAT rate applied'],
      ['5.5 %', 'art. 226(9): each rate, when lines differ'],
      ['VAT at 20 % on €170.00', 'art. 226(8): the taxable amount per rate'],
      ['€34.00', 'art. 226(10): the VAT amount payable'],
      ['Total to pay', 'common practice: the total including VAT'],
      ['€214.55', 'common practice: the total including VAT'],
      ['Due date: 2026-11-16', 'common practice: when to pay'],
      ['IBAN: GB82 WEST 1234 5698 7654 32', 'common practice: where to pay'],
      ['BIC: LARKGB21', 'common practice: where to pay'],
      ['payment reference INV-2026-0007', 'common practice: what to quote'],
      ['Company number: 00011122', 'common practice (a company\'s number on its business letters)'],
    ]
    for (const [needle, source] of required) expect(text, `missing ${needle} (${source})`).toContain(needle)
    expect(text).not.toContain('?')
  })

  it('is the same document every time it is drawn from the same record', async () => {
    const frozen = freezeInvoice(input)
    const [a, b] = await Promise.all([renderInvoicePdf(frozen, assets), renderInvoicePdf(structuredClone(frozen), assets)])
    expect(await pdfText(a)).toBe(await pdfText(b))
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true)
  })

  it('names the invoice a credit note corrects', async () => {
    const note = freezeInvoice({ ...input, kind: 'credit_note', number: 'CN-2026-0009', dueDate: null, corrects: { number: 'INV-2026-0007', issueDate: '2026-11-02' },
      lines: input.lines.map(l => ({ ...l, unitMinor: -l.unitMinor, netMinor: -l.netMinor, taxMinor: -l.taxMinor, grossMinor: -l.grossMinor })) })
    const text = await pdfText(await renderInvoicePdf(note, assets))
    expect(text).toContain('CREDIT NOTE')
    expect(text).toContain('Corrects invoice INV-2026-0007 of 2026-11-02') // art. 219: an amending document refers to the invoice
    expect(text).toContain('Total credited')
  })

  it('continues on a second page when the lines do not fit', async () => {
    const line = { description: 'A very long line description that goes on and on beyond the column width of the table', quantity: 1, unitMinor: 100, taxRateBasisPoints: 0, netMinor: 100, taxMinor: 0, grossMinor: 100 }
    const bytes = await renderInvoicePdf(freezeInvoice({ ...input, lines: Array.from({ length: 40 }, () => line) }), assets)
    expect((await PDFDocument.load(bytes)).getPageCount()).toBeGreaterThan(1)
  })
})

describe('the receipt PDF', () => {
  it('names the receipt, the payment, the invoice and its lines, and what is left', async () => {
    const text = await pdfText(await renderReceiptPdf({
      receiptNumber: 'R-INV-2026-0007-1', receivedOn: '2026-11-05', method: 'card', amountMinor: 10000, paidToDateMinor: 10000, balanceMinor: 11455, invoice: freezeInvoice(input),
    }, assets))
    for (const needle of ['RECEIPT', 'Receipt number: R-INV-2026-0007-1', 'Received on: 2026-11-05', 'For invoice INV-2026-0007', 'Amount received: €100.00 (Card)', '2 × Home training visit', 'Still to pay', '€114.55', 'Zoë Ångström-Łukasiewicz', 'Invented Scent Dogs Ltd']) {
      expect(text).toContain(needle) // common practice: what a receipt states
    }
  })
})
