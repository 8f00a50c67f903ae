// Card payments for invoices through Stripe Checkout, and the webhook that records them: verified, processed once,
// tolerant of events arriving late or twice, the payment and the invoice's new state in one transaction.
import { eq } from 'drizzle-orm'
import type Stripe from 'stripe'
import { clients, invoicePayments, invoices, stripeEvents } from '../database/schema'
import { balanceDue } from '../../shared/utils/invoices'
import { todayInTimeZone } from '../../shared/utils/dogs'
import type { AuthUser } from '../utils/authz'
import { readInvoiceSettings, type InvoiceRow } from './invoices'

function paymentConflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message })
}

/** A Checkout Session for what is still owed on an open invoice; the same request again gets the same session. */
export async function createInvoiceCheckout(user: AuthUser, invoice: InvoiceRow) {
  if (invoice.kind !== 'invoice' || invoice.status !== 'open') paymentConflict(`This invoice is ${invoice.status === 'open' ? 'a credit note' : invoice.status}; there is nothing to pay.`)
  const owed = balanceDue(invoice.grossMinor, invoice.paidMinor)
  if (owed < 1) paymentConflict('There is nothing left to pay on this invoice.')
  const stripe = useStripeClient()
  const back = user.role === 'handler' ? `/handler/invoices/${invoice.id}` : `/admin/invoices/${invoice.id}`
  try {
    const session = await stripe.checkout.sessions.create({
      mode: 'payment',
      client_reference_id: invoice.id,
      metadata: { invoiceId: invoice.id, invoiceNumber: invoice.number ?? '' },
      line_items: [{ quantity: 1, price_data: { currency: invoice.currency.toLowerCase(), unit_amount: owed, product_data: { name: `Invoice ${invoice.number}` } } }],
      success_url: appUrl(`${back}?paid=1`),
      cancel_url: appUrl(back),
    }, { idempotencyKey: `checkout:${invoice.id}:${user.id}:${invoice.paidMinor}:${owed}` })
    if (!session.url) throw new Error('No payment page address')
    return { url: session.url, sessionId: session.id }
  }
  catch (err) {
    if ((err as { statusCode?: number }).statusCode === 409) throw err
    logFailure('stripe.failed', 'A call to Stripe failed.', err)
    throw createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'Card payments are unavailable right now. Nothing was charged; try again in a few minutes.' })
  }
}

type Outcome = 'recorded' | 'duplicate' | 'ignored' | 'unknown-invoice'

/** Verifies and processes one webhook delivery. Throws 400 on a bad signature; otherwise says what it did. */
export async function handleStripeWebhook(rawBody: string, signature: string | undefined): Promise<{ received: true, outcome: Outcome }> {
  let evt: Stripe.Event
  try {
    evt = useStripeClient().webhooks.constructEvent(rawBody, signature ?? '', stripeWebhookSecret())
  }
  catch (err) {
    if ((err as { statusCode?: number }).statusCode === 503) throw err
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: `Webhook refused: ${(err as Error).message.split('\n')[0]}` })
  }
  const paidTypes = ['checkout.session.completed', 'checkout.session.async_payment_succeeded']
  const session = evt.data.object as Stripe.Checkout.Session
  const invoiceId = paidTypes.includes(evt.type) ? (session.metadata?.invoiceId ?? session.client_reference_id ?? null) : null
  return useDb().transaction(async (tx) => {
    const [fresh] = await tx.insert(stripeEvents).values({ id: evt.id, type: evt.type, invoiceId, outcome: 'ignored' })
      .onConflictDoNothing().returning()
    if (!fresh) return { received: true as const, outcome: 'duplicate' as const }
    // Only a paid session moves money; any other event (an expiry arriving late, an unpaid completion) is noted only.
    if (!invoiceId || session.payment_status !== 'paid') return { received: true as const, outcome: 'ignored' as const }
    const [row] = await tx.select({ invoice: invoices, client: clients }).from(invoices).innerJoin(clients, eq(clients.id, invoices.clientId))
      .where(eq(invoices.id, invoiceId)).limit(1)
    if (!row) {
      await tx.update(stripeEvents).set({ outcome: 'unknown-invoice' }).where(eq(stripeEvents.id, evt.id))
      return { received: true as const, outcome: 'unknown-invoice' as const }
    }
    const reference = typeof session.payment_intent === 'string' ? session.payment_intent : session.id
    const amount = session.amount_total ?? 0
    // The same payment seen through another event (completed, then async-succeeded) is recorded once.
    const [payment] = await tx.insert(invoicePayments).values({
      invoiceId, amountMinor: amount, method: 'card', reference, receivedOn: todayInTimeZone((await readInvoiceSettings(tx)).business.timeZone, new Date(evt.created * 1000)),
    }).onConflictDoNothing().returning()
    if (!payment) return { received: true as const, outcome: 'duplicate' as const }
    const paidMinor = row.invoice.paidMinor + amount
    const stillOpen = row.invoice.status === 'open'
    const [updated] = await tx.update(invoices).set({
      paidMinor,
      ...(stillOpen && paidMinor >= row.invoice.grossMinor ? { status: 'paid' as const, paidAt: new Date() } : {}),
    }).where(eq(invoices.id, invoiceId)).returning()
    await tx.update(stripeEvents).set({ outcome: 'recorded' }).where(eq(stripeEvents.id, evt.id))
    await queueInvoiceReceipt(tx, updated!, row.client, payment)
    await logAudit(tx, {
      actorId: null, action: stillOpen ? 'invoice.card-payment' : 'invoice.card-payment-after-close', entityType: 'invoice', entityId: invoiceId, clientId: row.client.id,
      data: { name: `Card payment on ${row.invoice.number}`, amountMinor: amount, reference, refundNeeded: !stillOpen || paidMinor > row.invoice.grossMinor },
    })
    return { received: true as const, outcome: 'recorded' as const }
  })
}
