// Card payments for invoices through Stripe Checkout, and the webhook that records them: verified, processed once,
// tolerant of events arriving late or twice, the payment and the invoice's new state in one transaction.
import { randomUUID } from 'node:crypto'
import { eq, sql } from 'drizzle-orm'
import type Stripe from 'stripe'
import { clients, invoicePayments, invoices, paymentProblems, stripeEvents } from '../database/schema'
import { balanceDue } from '../../shared/utils/invoices'
import { todayInTimeZone } from '../../shared/utils/dogs'
import { nextReceiptNumber, readInvoiceSettings, type InvoiceRow } from './invoices'

function paymentConflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message })
}

/**
 * The Checkout Session for what is still owed on an open invoice: one per invoice whoever asks (the household's
 * handlers, the office), reused while it is open, so an invoice is paid once. The session is made the same for every
 * payer (a neutral return address), and its idempotency key names the invoice and the amount, so two payers asking at
 * the same moment get the same session from the provider. When the amount owed has changed since (a transfer
 * recorded), the old session is expired first so it can no longer be paid.
 */
export async function createInvoiceCheckout(invoice: InvoiceRow) {
  if (invoice.kind !== 'invoice' || invoice.status !== 'open') paymentConflict(`This invoice is ${invoice.status === 'open' ? 'a credit note' : invoice.status}; there is nothing to pay.`)
  const owed = balanceDue(invoice.grossMinor, invoice.paidMinor)
  if (owed < 1) paymentConflict('There is nothing left to pay on this invoice.')
  const stripe = useStripeClient()
  try {
    if (invoice.checkoutSessionId) {
      const open = await stripe.checkout.sessions.retrieve(invoice.checkoutSessionId)
      if (open.status === 'complete') paymentConflict('This invoice is already being paid: a card payment went through a moment ago and is being recorded. Reload the page in a minute.')
      if (open.status === 'open' && open.amount_total === owed && open.url) return { url: open.url, sessionId: open.id }
      if (open.status === 'open') await stripe.checkout.sessions.expire(open.id)
    }
    // Every payer shares one key per invoice and amount: a nonce written once per invoice (kept if already there).
    const db = useDb()
    await db.update(invoices).set({ checkoutNonce: sql`coalesce(${invoices.checkoutNonce}, ${randomUUID()})` }).where(eq(invoices.id, invoice.id))
    const [{ nonce } = { nonce: null }] = await db.select({ nonce: invoices.checkoutNonce }).from(invoices).where(eq(invoices.id, invoice.id))
    const back = `/invoices/${invoice.id}`
    const session = await stripe.checkout.sessions.create({
      mode: 'payment',
      client_reference_id: invoice.id,
      // What we asked for travels with the signed event, so the webhook can check the provider charged exactly that.
      metadata: { invoiceId: invoice.id, invoiceNumber: invoice.number ?? '', amountMinor: String(owed), currency: invoice.currency },
      line_items: [{ quantity: 1, price_data: { currency: invoice.currency.toLowerCase(), unit_amount: owed, product_data: { name: `Invoice ${invoice.number}` } } }],
      success_url: appUrl(`${back}?paid=1`),
      cancel_url: appUrl(back),
    }, { idempotencyKey: `checkout:${invoice.id}:${nonce}:${invoice.paidMinor}:${owed}:${invoice.checkoutSessionId ?? 'first'}` })
    // A replayed answer for a session paid meanwhile: the payment is on its way.
    if (session.status === 'complete') paymentConflict('This invoice is already being paid: a card payment went through a moment ago and is being recorded. Reload the page in a minute.')
    if (!session.url) throw new Error('No payment page address')
    await db.update(invoices).set({ checkoutSessionId: session.id }).where(eq(invoices.id, invoice.id))
    return { url: session.url, sessionId: session.id }
  }
  catch (err) {
    if ((err as { statusCode?: number }).statusCode === 409) throw err
    logFailure('stripe.failed', 'A call to Stripe failed.', err)
    throw createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'Card payments are unavailable right now. Nothing was charged; try again in a few minutes.' })
  }
}

/** Refuses a delivery signed more than the tolerance ahead of our clock (the SDK only checks the past). */
function refuseFutureSignature(signature: string | undefined, now = Date.now()) {
  const t = Number(/(?:^|,)t=(\d+)/.exec(signature ?? '')?.[1])
  // 300 s: the same tolerance the SDK applies to old deliveries (Stripe's documented default, from memory).
  if (Number.isFinite(t) && t * 1000 > now + 300_000) {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'Webhook refused: its timestamp is more than 5 minutes in the future.' })
  }
}

type Outcome = 'recorded' | 'duplicate' | 'ignored' | 'problem'

/** What the session charged, against what the invoice asks for; a reason when they differ. */
function chargeMismatch(session: Stripe.Checkout.Session, invoice: InvoiceRow): { kind: 'currency-mismatch' | 'amount-mismatch', detail: string } | null {
  const charged = (session.currency ?? '').toUpperCase()
  if (charged !== invoice.currency) return { kind: 'currency-mismatch', detail: `Charged in ${charged || 'an unknown currency'}, but invoice ${invoice.number} is in ${invoice.currency}.` }
  const asked = Number(session.metadata?.amountMinor)
  const amount = session.amount_total ?? 0
  if (!Number.isSafeInteger(asked) || asked !== amount || amount < 1) return { kind: 'amount-mismatch', detail: `Charged ${amount} minor units, but ${Number.isSafeInteger(asked) ? asked : 'no amount'} was asked for on invoice ${invoice.number}.` }
  return null
}

/** Verifies and processes one webhook delivery. Throws 400 on a bad signature; otherwise says what it did. */
export async function handleStripeWebhook(rawBody: string, signature: string | undefined): Promise<{ received: true, outcome: Outcome }> {
  refuseFutureSignature(signature)
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
  const reference = typeof session.payment_intent === 'string' ? session.payment_intent : session.id
  const result = await useDb().transaction(async (tx) => {
    const [fresh] = await tx.insert(stripeEvents).values({ id: evt.id, type: evt.type, invoiceId, outcome: 'ignored' })
      .onConflictDoNothing().returning()
    if (!fresh) {
      const [seen] = await tx.select({ outcome: stripeEvents.outcome }).from(stripeEvents).where(eq(stripeEvents.id, evt.id)).limit(1)
      return seen?.outcome === 'unknown-invoice' ? 'unknown-invoice' as const : 'duplicate' as const
    }
    // Only a paid session moves money; any other event (an expiry arriving late, an unpaid completion) is noted only.
    if (!invoiceId || session.payment_status !== 'paid') return 'ignored' as const
    const [row] = await tx.select({ invoice: invoices, client: clients }).from(invoices).innerJoin(clients, eq(clients.id, invoices.clientId))
      .where(eq(invoices.id, invoiceId)).limit(1)
    const problem = row ? chargeMismatch(session, row.invoice) : { kind: 'unknown-invoice' as const, detail: `A card payment names invoice ${invoiceId}, which does not exist here.` }
    if (problem) {
      // Not a payment: listed for the office (Invoices → Payments to look into), with what the provider charged.
      await tx.insert(paymentProblems).values({
        eventId: evt.id, invoiceId: row ? invoiceId : null, kind: problem.kind, amountMinor: session.amount_total ?? null,
        currency: (session.currency ?? '').toUpperCase() || null, reference, detail: problem.detail,
      }).onConflictDoNothing()
      await tx.update(stripeEvents).set({ outcome: problem.kind }).where(eq(stripeEvents.id, evt.id))
      await logAudit(tx, { actorId: null, action: 'invoice.payment-problem', entityType: 'invoice', entityId: row ? invoiceId : undefined, clientId: row?.client.id, data: { name: 'Card payment not recorded', kind: problem.kind, detail: problem.detail, reference } })
      return problem.kind === 'unknown-invoice' ? 'unknown-invoice' as const : 'problem' as const
    }
    const amount = session.amount_total ?? 0
    // The same payment seen through another event (completed, then async-succeeded) is recorded once.
    const [payment] = await tx.insert(invoicePayments).values({
      invoiceId, amountMinor: amount, method: 'card', reference, receiptNumber: await nextReceiptNumber(tx, row!.invoice), receivedOn: todayInTimeZone((await readInvoiceSettings(tx)).business.timeZone, new Date(evt.created * 1000)),
    }).onConflictDoNothing().returning()
    if (!payment) return 'duplicate' as const
    const inv = row!.invoice
    const paidMinor = inv.paidMinor + amount
    const stillOpen = inv.status === 'open'
    const [updated] = await tx.update(invoices).set({
      paidMinor,
      ...(stillOpen && paidMinor >= inv.grossMinor ? { status: 'paid' as const, paidAt: new Date() } : {}),
    }).where(eq(invoices.id, invoiceId)).returning()
    await tx.update(stripeEvents).set({ outcome: 'recorded' }).where(eq(stripeEvents.id, evt.id))
    await queueInvoiceReceipt(tx, updated!, row!.client, payment)
    // Paid after it closed, or more than was owed: the office sees the difference as money to refund.
    await logAudit(tx, {
      actorId: null, action: stillOpen ? 'invoice.card-payment' : 'invoice.card-payment-after-close', entityType: 'invoice', entityId: invoiceId, clientId: row!.client.id,
      data: { name: `Card payment on ${inv.number}`, amountMinor: amount, reference, refundNeeded: !stillOpen || paidMinor > inv.grossMinor },
    })
    return 'recorded' as const
  })
  if (result === 'unknown-invoice') {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: `Webhook refused: the payment names invoice ${invoiceId}, which does not exist. It is listed for the office to look into.` })
  }
  return { received: true, outcome: result }
}
