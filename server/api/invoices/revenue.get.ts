// Payments received per month over the last 12 months, per currency (the office only).
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  return invoiceRevenue()
})
