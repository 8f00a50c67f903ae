import { z } from 'zod'

// One payment's receipt as a PDF: the household (its own), its trainer and the office.
export default defineEventHandler(async (event) => {
  const { id, paymentId } = getValidatedParams(event, z.object({ id: z.string().min(1).max(64), paymentId: z.string().min(1).max(64) }))
  const { invoice, client } = await requireInvoiceAccess(event, id)
  const doc = await receiptDocument(invoice, client, paymentId)
  if (!doc) notFound('receipt')
  const bytes = await renderReceiptPdf(doc, await pdfAssets(doc.invoice.seller.logoId))
  setResponseHeaders(event, {
    'content-type': 'application/pdf',
    'content-disposition': `attachment; filename="${doc.receiptNumber.replace(/[^\w-]/g, '')}.pdf"`,
    'cache-control': 'private, no-store',
  })
  return Buffer.from(bytes)
})
