import { idParams } from '../../../../shared/schemas/common'

// The invoice or credit note as a PDF, drawn from its record frozen at issue (the household: its issued ones; the
// office: also a draft, as a preview from today's settings).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { invoice, client } = await requireInvoiceAccess(event, id)
  const doc = await documentOf(invoice, client)
  const bytes = await renderInvoicePdf(doc, await pdfAssets(doc.seller.logoId))
  setResponseHeaders(event, {
    'content-type': 'application/pdf',
    'content-disposition': `attachment; filename="${(invoice.number ?? 'draft-invoice').replace(/[^\w-]/g, '')}.pdf"`,
    'cache-control': 'private, no-store',
  })
  return Buffer.from(bytes)
})
