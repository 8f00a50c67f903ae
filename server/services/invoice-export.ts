// The accountant's export: every invoice and credit note issued, every payment received and refund paid in a date
// range, one CSV (RFC 4180, guarded against formula injection by shared/utils/csv.ts), amounts in minor units and
// in the currency's own decimals.
import { and, asc, eq, gte, lte } from 'drizzle-orm'
import { clients, invoicePayments, invoiceRefunds, invoices } from '../database/schema'
import { toCsv } from '../../shared/utils/csv'
import { minorUnits } from '../../shared/utils/money'

const decimal = (minor: number, currency: string) => {
  const digits = minorUnits(currency)
  return (minor / 10 ** digits).toFixed(digits)
}

export async function invoiceExportCsv(from: string, to: string) {
  const db = useDb()
  const [docs, payments, refunds] = await Promise.all([
    db.select({ inv: invoices, household: clients.householdName }).from(invoices).innerJoin(clients, eq(clients.id, invoices.clientId))
      .where(and(gte(invoices.issueDate, from), lte(invoices.issueDate, to))).orderBy(asc(invoices.issueDate), asc(invoices.numberSeq)),
    db.select({ p: invoicePayments, number: invoices.number, currency: invoices.currency, household: clients.householdName }).from(invoicePayments)
      .innerJoin(invoices, eq(invoices.id, invoicePayments.invoiceId)).innerJoin(clients, eq(clients.id, invoices.clientId))
      .where(and(gte(invoicePayments.receivedOn, from), lte(invoicePayments.receivedOn, to))).orderBy(asc(invoicePayments.receivedOn), asc(invoicePayments.createdAt)),
    db.select({ r: invoiceRefunds, number: invoices.number, currency: invoices.currency, household: clients.householdName }).from(invoiceRefunds)
      .innerJoin(invoices, eq(invoices.id, invoiceRefunds.invoiceId)).innerJoin(clients, eq(clients.id, invoices.clientId))
      .where(and(gte(invoiceRefunds.paidOn, from), lte(invoiceRefunds.paidOn, to))).orderBy(asc(invoiceRefunds.paidOn), asc(invoiceRefunds.createdAt)),
  ])
  const numberById = new Map(docs.map(d => [d.inv.id, d.inv.number]))
  const rows: unknown[][] = [['record', 'number', 'date', 'due_date', 'household', 'billed_to', 'currency', 'net', 'tax', 'gross', 'status', 'refers_to', 'method', 'reference']]
  for (const { inv, household } of docs) {
    rows.push([
      inv.kind === 'credit_note' ? 'credit_note' : 'invoice', inv.number, inv.issueDate, inv.dueDate, household, inv.frozen?.buyer.name ?? '',
      inv.currency, decimal(inv.netMinor, inv.currency), decimal(inv.taxMinor, inv.currency), decimal(inv.grossMinor, inv.currency), inv.status,
      inv.creditsInvoiceId ? (inv.frozen?.corrects?.number ?? numberById.get(inv.creditsInvoiceId) ?? '') : '', '', '',
    ])
  }
  for (const { p, number, currency, household } of payments) {
    rows.push(['payment', p.receiptNumber ?? '', p.receivedOn, '', household, '', currency, '', '', decimal(p.amountMinor, currency), '', number, p.method, p.method === 'card' ? '' : (p.reference ?? '')])
  }
  for (const { r, number, currency, household } of refunds) {
    rows.push(['refund', '', r.paidOn, '', household, '', currency, '', '', decimal(-r.amountMinor, currency), '', number, r.method, r.reference ?? ''])
  }
  return { csv: toCsv(rows), count: rows.length - 1 }
}
