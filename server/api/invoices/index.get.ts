import { invoiceListQuery } from '../../../shared/schemas/invoices'

// Invoices the user may see: the admin's every one, a trainer's their clients', a household's its own issued ones.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const query = getValidatedQueryParams(event, invoiceListQuery)
  return listInvoices(user, query)
})
