// The PDF layout renders with the currency's own symbols and long content, and reads back as a valid PDF.
import { PDFDocument } from 'pdf-lib'
import { describe, expect, it } from 'vitest'
import { renderInvoicePdf } from '../../server/services/invoice-pdf'

const base = {
  kind: 'invoice' as const, number: 'INV-2026-0007', state: 'open', currency: 'EUR', issueDate: '2026-11-02', dueDate: '2026-11-16',
  householdName: 'Example household (invented)', personName: 'Théo Example', netMinor: 10000, taxMinor: 2000, grossMinor: 12000, balanceMinor: 12000,
  notes: 'Thank you.', payments: [], business: { name: 'Invented Dogs Ltd', locale: 'fr-FR', taxNumber: 'GB123456789', footer: 'Footer — with a dash' },
}

describe('renderInvoicePdf', () => {
  it('renders one page for a short invoice, titled with its number, even in a locale with narrow spaces', async () => {
    const bytes = await renderInvoicePdf({ ...base, lines: [{ description: 'Séance supplémentaire', quantity: 1, unitMinor: 10000, taxRateBasisPoints: 2000, taxMinor: 2000, grossMinor: 12000 }] })
    const doc = await PDFDocument.load(bytes)
    expect(doc.getTitle()).toBe('Invoice INV-2026-0007')
    expect(doc.getPageCount()).toBe(1)
  })
  it('continues on a second page when the lines do not fit', async () => {
    const line = { description: 'A very long line description that goes on and on beyond the column width', quantity: 1, unitMinor: 100, taxRateBasisPoints: 0, taxMinor: 0, grossMinor: 100 }
    const bytes = await renderInvoicePdf({ ...base, lines: Array.from({ length: 60 }, () => line) })
    expect((await PDFDocument.load(bytes)).getPageCount()).toBe(2)
  })
})
