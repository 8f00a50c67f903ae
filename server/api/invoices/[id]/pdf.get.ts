import { idParams } from '../../../../shared/schemas/common'

// The invoice as a PDF download, for the household (its issued invoices) and the office.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, invoice, client } = await requireInvoiceAccess(event, id)
  const detail = await getInvoiceDetail(user, invoice, client)
  const bytes = await renderInvoicePdf(detail)
  setResponseHeaders(event, {
    'content-type': 'application/pdf',
    'content-disposition': `attachment; filename="${(invoice.number ?? 'draft-invoice').replace(/[^\w-]/g, '')}.pdf"`,
    'cache-control': 'private, no-store',
  })
  return Buffer.from(bytes)
})
