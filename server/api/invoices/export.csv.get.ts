import { invoiceExportQuery } from '../../../shared/schemas/invoices'

// The accountant's CSV of invoices, credit notes, payments and refunds between two days (the office only).
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const { from, to } = getValidatedQueryParams(event, invoiceExportQuery)
  const { csv, count } = await invoiceExportCsv(from, to)
  await logAudit(useDb(), { actorId: user.id, action: 'invoice.exported', entityType: 'invoice', data: { name: `Invoices exported ${from} to ${to}`, count } })
  setResponseHeaders(event, {
    'content-type': 'text/csv; charset=utf-8; header=present',
    'content-disposition': `attachment; filename="invoices-${from}-to-${to}.csv"`,
    'cache-control': 'private, no-store',
  })
  return csv
})
