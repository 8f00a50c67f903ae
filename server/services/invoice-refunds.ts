// Money going back to a household (an overpayment, a credited paid invoice) and card payments the webhook would not
// record (another currency or amount, an unknown invoice): what the office sees and records about them.
import { and, desc, eq, isNull, sql } from 'drizzle-orm'
import { clients, invoiceRefunds, invoices, paymentProblems } from '../database/schema'
import type { RefundInput } from '../../shared/schemas/invoices'
import { refundDue } from '../../shared/utils/invoices'
import { formatMoney } from '../../shared/utils/money'
import type { AuthUser } from '../utils/authz'
import type { InvoiceRow } from './invoices'

type ClientRow = typeof clients.$inferSelect

/** Records money paid back against an overpaid invoice or a credit note; never more than is owed back. */
export async function recordRefund(user: AuthUser, invoice: InvoiceRow, client: ClientRow, input: RefundInput) {
  const due = refundDue(invoice)
  if (due < 1) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'Nothing is owed back on this document, so there is no refund to record.' })
  if (input.amountMinor > due) {
    const message = `That is more than is owed back (${formatMoney(due, invoice.currency)}).`
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message, data: { fieldErrors: { amountMinor: message } } })
  }
  return useDb().transaction(async (tx) => {
    const refundedMinor = invoice.refundedMinor + input.amountMinor
    const settled = invoice.kind === 'credit_note' && refundedMinor >= -invoice.grossMinor
    // Guarded on the amount read before: a refund recorded at the same moment makes this match nothing.
    const [row] = await tx.update(invoices).set({ refundedMinor, ...(settled ? { status: 'paid' as const, paidAt: new Date() } : {}) })
      .where(and(eq(invoices.id, invoice.id), eq(invoices.refundedMinor, invoice.refundedMinor))).returning()
    if (!row) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This document was changed by someone else just now. Reload and try again.' })
    const [refund] = await tx.insert(invoiceRefunds).values({
      invoiceId: invoice.id, amountMinor: input.amountMinor, method: input.method, reference: input.reference || null, paidOn: input.paidOn, recordedById: user.id,
    }).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'invoice.refund-recorded', entityType: 'invoice', entityId: invoice.id, clientId: client.id,
      data: { name: `Refund on ${invoice.number}`, amountMinor: input.amountMinor, method: input.method },
    })
    return { invoice: row, refund: refund! }
  })
}

/** Card payments not recorded, the ones still to look into first, with their household when the invoice exists. */
export async function listPaymentProblems() {
  const rows = await useDb().select({ problem: paymentProblems, number: invoices.number, householdName: clients.householdName })
    .from(paymentProblems).leftJoin(invoices, eq(invoices.id, paymentProblems.invoiceId)).leftJoin(clients, eq(clients.id, invoices.clientId))
    .orderBy(sql`${paymentProblems.resolvedAt} is not null`, desc(paymentProblems.createdAt)).limit(200)
  return { rows: rows.map(r => ({ ...r.problem, invoiceNumber: r.number, householdName: r.householdName })) }
}

/** The office says what it did about a payment problem (refunded it with the provider, matched it by hand, …). */
export async function resolvePaymentProblem(user: AuthUser, id: string, resolution: string) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(paymentProblems).set({ resolvedAt: new Date(), resolvedById: user.id, resolution })
      .where(and(eq(paymentProblems.id, id), isNull(paymentProblems.resolvedAt))).returning()
    if (!row) {
      const [exists] = await tx.select({ id: paymentProblems.id }).from(paymentProblems).where(eq(paymentProblems.id, id)).limit(1)
      if (!exists) notFound('payment problem')
      throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This payment problem was already marked as dealt with.' })
    }
    await logAudit(tx, { actorId: user.id, action: 'invoice.payment-problem-resolved', entityType: 'invoice', entityId: row.invoiceId ?? undefined, data: { name: 'Payment problem dealt with', resolution } })
    return row
  })
}
