// Invoices: loading what a user may see, drafts, issuing with a gap-free number, credit notes, manual payments,
// each change in one transaction with its audit entry and its e-mail (outbox).
import type { H3Event } from 'h3'
import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm'
import { clients, invoiceCounters, invoiceLines, invoicePayments, invoiceRefunds, invoices } from '../database/schema'
import type { InvoiceCreateInput, ManualPaymentInput } from '../../shared/schemas/invoices'
import { businessProfile, businessProfileSchema, type BusinessProfile } from '../../shared/schemas/settings-business'
import { INVOICE_POLICY_DEFAULTS, INVOICE_POLICY_KEY, invoicePolicySchema, type InvoicePolicy } from '../../shared/schemas/settings-invoices'
import { formatMoney, lineTotals, minorUnits } from '../../shared/utils/money'
import { billingParty, freezeInvoice, receiptNumberFor, type FrozenInvoice } from '../../shared/utils/invoice-document'
import type { ReceiptDocument } from './invoice-pdf'
import { BUSINESS_IDENTITY_DEFAULTS, BUSINESS_IDENTITY_KEY, BUSINESS_LOGO_KEY, businessIdentitySchema, businessLogoSchema, missingIdentity, type BusinessIdentity } from '../../shared/schemas/settings-identity'
import {
  addDays, balanceDue, refundDue, canCredit, canIssue, canVoid, creditLines, formatInvoiceNumber, invoiceTotalsForIssue, shownState,
  type StoredLine,
} from '../../shared/utils/invoices'
import { todayInTimeZone } from '../../shared/utils/dogs'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

export type InvoiceRow = typeof invoices.$inferSelect
type ClientRow = typeof clients.$inferSelect

export async function readInvoiceSettings(db: DbOrTx = useDb()): Promise<{ business: BusinessProfile, policy: InvoicePolicy }> {
  const [business, policy] = await Promise.all([
    readSetting('business', businessProfileSchema, businessProfile.defaults as BusinessProfile, db),
    readSetting(INVOICE_POLICY_KEY, invoicePolicySchema, INVOICE_POLICY_DEFAULTS, db),
  ])
  return { business, policy }
}

export function readIdentity(db: DbOrTx = useDb()): Promise<BusinessIdentity> {
  return readSetting(BUSINESS_IDENTITY_KEY, businessIdentitySchema, BUSINESS_IDENTITY_DEFAULTS, db)
}

/** Refuses to issue while the seller's identity is incomplete: an invoice must say who it is from (art. 226(5)). */
function requireCompleteIdentity(identity: BusinessIdentity) {
  const missing = missingIdentity(identity)
  if (missing.length) {
    throw createError({
      statusCode: 422, statusMessage: 'Unprocessable Content',
      message: `Before an invoice can be issued, fill in ${missing.join(', ')} under Policies → Business identity. An invoice must say who it is from.`,
    })
  }
}

interface DocumentFacts {
  kind: 'invoice' | 'credit_note', number: string, issueDate: string, dueDate: string | null, currency: string, notes: string | null
  invoiceId: string, client: ClientRow, corrects: FrozenInvoice['corrects']
}

/** The document from the settings, the client's billing details and the stored lines of this moment. */
async function composeDocument(db: DbOrTx, d: DocumentFacts, identity: BusinessIdentity): Promise<FrozenInvoice> {
  const [{ business, policy }, logo, lines] = await Promise.all([
    readInvoiceSettings(db),
    readSetting(BUSINESS_LOGO_KEY, businessLogoSchema, { logoId: null }, db),
    db.select().from(invoiceLines).where(eq(invoiceLines.invoiceId, d.invoiceId)).orderBy(asc(invoiceLines.position)),
  ])
  return freezeInvoice({
    kind: d.kind, number: d.number, issueDate: d.issueDate, dueDate: d.dueDate, currency: d.currency, locale: business.locale,
    seller: {
      name: identity.legalName || business.name, tradingName: identity.tradingName || undefined,
      address: [identity.addressLine1, identity.addressLine2, identity.town, identity.postcode].filter(Boolean), country: identity.country,
      vatNumber: identity.vatNumber || undefined, companyNumber: identity.companyNumber || undefined,
      email: identity.email || undefined, phone: identity.phone || undefined, logoId: logo.logoId,
    },
    buyer: billingParty(d.client, identity.country),
    lines: lines.map(l => ({ description: l.description, quantity: l.quantity, unitMinor: l.unitMinor, taxRateBasisPoints: l.taxRateBasisPoints, netMinor: l.netMinor, taxMinor: l.taxMinor, grossMinor: l.grossMinor })),
    payment: {
      terms: identity.paymentTerms || `Payment within ${policy.paymentTermsDays} days of the date of issue.`,
      iban: identity.iban, bic: identity.bic, bankAccountText: identity.bankAccountText, reference: d.number,
    },
    footer: policy.footer, notes: d.notes, corrects: d.corrects,
  })
}

/**
 * The document as issued, frozen: seller, buyer, lines, rates, totals and wording of this moment, stored on the
 * invoice; its PDF is drawn from this alone. Refused while the seller's identity is incomplete.
 */
async function freezeDocument(tx: DbOrTx, d: DocumentFacts): Promise<FrozenInvoice> {
  const identity = await readIdentity(tx)
  requireCompleteIdentity(identity)
  return composeDocument(tx, d, identity)
}

/**
 * What the PDF of an invoice is drawn from: its frozen record once issued. A draft (the office's preview) and a
 * document issued before records were frozen are drawn from today's settings instead.
 */
export async function documentOf(invoice: InvoiceRow, client: ClientRow): Promise<FrozenInvoice> {
  if (invoice.frozen) return invoice.frozen
  const db = useDb()
  let corrects: FrozenInvoice['corrects'] = null
  if (invoice.creditsInvoiceId) {
    const [orig] = await db.select({ number: invoices.number, issueDate: invoices.issueDate }).from(invoices).where(eq(invoices.id, invoice.creditsInvoiceId)).limit(1)
    if (orig?.number) corrects = { number: orig.number, issueDate: orig.issueDate }
  }
  const { business } = await readInvoiceSettings(db)
  return composeDocument(db, {
    kind: invoice.kind, number: invoice.number ?? 'Draft (not yet issued)', issueDate: invoice.issueDate ?? todayInTimeZone(business.timeZone),
    dueDate: invoice.dueDate, currency: invoice.currency, notes: invoice.notes, invoiceId: invoice.id, client, corrects,
  }, await readIdentity(db))
}

// Concurrent writes in one process are queued by the database client itself (serialiseWrites in
// server/database/client.ts), so invoice numbering needs nothing more than its transaction.
function invoiceWrite<T>(fn: (tx: Tx) => Promise<T>): Promise<T> {
  return useDb().transaction(fn)
}

function invoiceConflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message })
}
function invoiceRuleError(fieldErrors: Record<string, string>): never {
  throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: Object.values(fieldErrors).join(' '), data: { fieldErrors } })
}

/** Loads an invoice whose client the user may see, or answers 404 (the same for "does not exist" and "not yours"). */
export async function requireInvoiceAccess(event: H3Event, invoiceId: string, opts: { admin?: boolean } = {}) {
  const user = requireUser(event)
  const [row] = await useDb().select({ invoice: invoices, client: clients }).from(invoices)
    .innerJoin(clients, eq(clients.id, invoices.clientId))
    .where(and(eq(invoices.id, invoiceId), clientScope(user))).limit(1)
  if (!row) notFound('invoice')
  // A household only ever sees issued documents; drafts are the office's.
  if (user.role === 'handler' && row.invoice.status === 'draft') notFound('invoice')
  if (opts.admin && user.role !== 'admin') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the office can change invoices.' })
  }
  return { user, invoice: row.invoice, client: row.client }
}

function present(inv: InvoiceRow, today: string, householdName?: string) {
  return {
    ...inv,
    householdName,
    state: shownState(inv.status, inv.dueDate, today),
    balanceMinor: inv.kind === 'invoice' && inv.status === 'open' ? balanceDue(inv.grossMinor, inv.paidMinor) : 0,
    refundDueMinor: refundDue(inv),
    // The provider's session is the office's business, never shown to a household; the frozen record is the PDF's.
    checkoutSessionId: undefined,
    checkoutNonce: undefined,
    frozen: undefined,
  }
}

/** Invoices the user may see, newest first, with the shown state and what is still owed. */
export async function listInvoices(user: AuthUser, query: { status?: string, clientId?: string }) {
  const db = useDb()
  const { business } = await readInvoiceSettings(db)
  const today = todayInTimeZone(business.timeZone)
  const where = and(
    clientScope(user),
    user.role === 'handler' ? sql`${invoices.status} <> 'draft'` : undefined,
    query.clientId ? eq(invoices.clientId, query.clientId) : undefined,
    query.status && query.status !== 'overdue' && query.status !== 'scheduled' ? eq(invoices.status, query.status as InvoiceRow['status']) : undefined,
    // A plan's instalments waiting for their day are listed only when asked for ("Planned instalments").
    query.status !== 'scheduled' ? sql`not (${invoices.status} = 'draft' and ${invoices.scheduledIssueOn} is not null)` : undefined,
    query.status === 'scheduled' ? and(eq(invoices.status, 'draft'), sql`${invoices.scheduledIssueOn} is not null`) : undefined,
    query.status === 'overdue' ? and(eq(invoices.status, 'open'), sql`${invoices.dueDate} < ${today}`) : undefined,
  )
  const rows = await db.select({ invoice: invoices, householdName: clients.householdName }).from(invoices)
    .innerJoin(clients, eq(clients.id, invoices.clientId)).where(where)
    .orderBy(
      // A plan's instalments still to be issued come last, soonest first; everything else newest first.
      sql`case when ${invoices.status} = 'draft' and ${invoices.scheduledIssueOn} is not null then 1 else 0 end`,
      sql`case when ${invoices.status} = 'draft' then ${invoices.scheduledIssueOn} end`,
      desc(invoices.createdAt), desc(invoices.id),
    ).limit(500)
  const shown = rows.map(r => present(r.invoice, today, r.householdName))
  const owed: Record<string, number> = {}
  for (const r of shown) if (r.balanceMinor > 0) owed[r.currency] = (owed[r.currency] ?? 0) + r.balanceMinor
  return { rows: shown, owed, today, locale: business.locale }
}

/**
 * The instalments of a fee plan still to be issued, soonest first: for a household, what is coming and when (only
 * the day, the amount and which part of the plan; the draft itself stays the office's until it is issued).
 */
export async function listUpcomingInstalments(user: AuthUser) {
  const db = useDb()
  const { business } = await readInvoiceSettings(db)
  const rows = await db.select({
    id: invoices.id, clientId: invoices.clientId, householdName: clients.householdName, planPart: invoices.planPart,
    issueOn: invoices.scheduledIssueOn, grossMinor: invoices.grossMinor, currency: invoices.currency,
  }).from(invoices).innerJoin(clients, eq(clients.id, invoices.clientId))
    .where(and(clientScope(user), eq(invoices.status, 'draft'), sql`${invoices.scheduledIssueOn} is not null`))
    .orderBy(asc(invoices.scheduledIssueOn), asc(invoices.id)).limit(200)
  return { rows: rows.map(({ id, ...r }) => (user.role === 'handler' ? r : { id, ...r })), locale: business.locale }
}

/** One invoice with its lines, payments, credit notes and what the page needs to print it. */
export async function getInvoiceDetail(user: AuthUser, invoice: InvoiceRow, client: ClientRow) {
  const db = useDb()
  const [{ business, policy }, identity, lines, payments, credits, refunds] = await Promise.all([
    readInvoiceSettings(db), readIdentity(db),
    db.select().from(invoiceLines).where(eq(invoiceLines.invoiceId, invoice.id)).orderBy(asc(invoiceLines.position)),
    db.select().from(invoicePayments).where(eq(invoicePayments.invoiceId, invoice.id)).orderBy(asc(invoicePayments.createdAt)),
    db.select({ id: invoices.id, number: invoices.number, status: invoices.status, grossMinor: invoices.grossMinor, creditsInvoiceId: invoices.creditsInvoiceId })
      .from(invoices).where(sql`${invoices.creditsInvoiceId} = ${invoice.id} OR ${invoices.id} = ${invoice.creditsInvoiceId ?? ''}`),
    db.select({ id: invoiceRefunds.id, amountMinor: invoiceRefunds.amountMinor, method: invoiceRefunds.method, paidOn: invoiceRefunds.paidOn })
      .from(invoiceRefunds).where(eq(invoiceRefunds.invoiceId, invoice.id)).orderBy(asc(invoiceRefunds.createdAt)),
  ])
  const today = todayInTimeZone(business.timeZone)
  return {
    ...present(invoice, today, client.householdName),
    personName: client.personName,
    lines,
    // A household sees its plain receipt number; a card payment's provider id stays the office's.
    payments: payments.map(p => ({
      ...p, recordedById: user.role === 'handler' ? null : p.recordedById,
      reference: user.role === 'handler' && p.method === 'card' ? null : p.reference,
    })),
    related: credits,
    refunds,
    // Once issued, the page shows who the document was from as it was frozen.
    business: {
      name: invoice.frozen?.seller.name ?? (identity.legalName || business.name), locale: business.locale,
      taxNumber: invoice.frozen ? (invoice.frozen.seller.vatNumber ?? '') : identity.vatNumber, footer: invoice.frozen?.footer ?? policy.footer,
    },
    buyer: invoice.frozen?.buyer ?? billingParty(client, identity.country),
    canChange: user.role === 'admin',
  }
}

/** A draft's currency and lines checked (422 naming the field), and its totals. */
function checkedDraftTotals(currency: string, input: InvoiceCreateInput) {
  try { minorUnits(currency) }
  catch (e) { invoiceRuleError({ currency: (e as Error).message }) }
  try { return invoiceTotalsForIssue(input.lines, 'invoice') }
  catch (e) { invoiceRuleError({ lines: (e as Error).message }) }
}

/** A draft invoice for a client, with its lines priced and taxed per line. */
export async function createInvoiceDraft(user: AuthUser, client: ClientRow, input: InvoiceCreateInput) {
  const { business, policy } = await readInvoiceSettings()
  const currency = input.currency ?? business.currency
  const totals = checkedDraftTotals(currency, input)
  return invoiceWrite(async (tx) => {
    const [inv] = await tx.insert(invoices).values({
      clientId: client.id, kind: 'invoice', status: 'draft', currency,
      netMinor: totals.netMinor, taxMinor: totals.taxMinor, grossMinor: totals.grossMinor,
      dueInDays: input.dueInDays ?? policy.paymentTermsDays, notes: input.notes, createdById: user.id,
    }).returning()
    await insertLines(tx, inv!.id, input.lines)
    await logAudit(tx, {
      actorId: user.id, action: 'invoice.drafted', entityType: 'invoice', entityId: inv!.id, clientId: client.id,
      data: { name: `Draft invoice for ${client.householdName}`, grossMinor: totals.grossMinor, currency },
    })
    return inv!
  })
}

/** Replaces a draft's lines, note, terms and currency. An issued invoice is never edited: it is credited instead. */
export async function updateInvoiceDraft(user: AuthUser, invoice: InvoiceRow, client: ClientRow, input: InvoiceCreateInput) {
  if (invoice.status !== 'draft') invoiceConflict(`This invoice is ${invoice.status === 'open' || invoice.status === 'paid' ? 'issued' : invoice.status}; an issued invoice is never edited. Credit it and issue a corrected one.`)
  const currency = input.currency ?? invoice.currency
  const totals = checkedDraftTotals(currency, input)
  return invoiceWrite(async (tx) => {
    const [row] = await tx.update(invoices).set({
      currency, netMinor: totals.netMinor, taxMinor: totals.taxMinor, grossMinor: totals.grossMinor,
      dueInDays: input.dueInDays ?? invoice.dueInDays, notes: input.notes ?? null,
    }).where(and(eq(invoices.id, invoice.id), eq(invoices.status, 'draft'))).returning()
    if (!row) invoiceConflict('This invoice was issued or discarded by someone else just now. Reload to see it.')
    await tx.delete(invoiceLines).where(eq(invoiceLines.invoiceId, invoice.id))
    await insertLines(tx, invoice.id, input.lines)
    await logAudit(tx, {
      actorId: user.id, action: 'invoice.draft-edited', entityType: 'invoice', entityId: invoice.id, clientId: client.id,
      data: { name: `Draft invoice for ${client.householdName} edited`, grossMinor: totals.grossMinor, currency },
    })
    return row
  })
}

async function insertLines(tx: Tx, invoiceId: string, lines: readonly StoredLine[]) {
  await tx.insert(invoiceLines).values(lines.map((l, i) => ({
    invoiceId, position: i + 1, description: l.description, unitMinor: l.unitMinor, quantity: l.quantity,
    taxRateBasisPoints: l.taxRateBasisPoints, ...lineTotals(l),
  })))
}

/** The next number of the year, inside the caller's transaction: rolled back with it, so no gap is ever left. */
async function nextInvoiceSeq(tx: Tx, year: number): Promise<number> {
  const [row] = await tx.insert(invoiceCounters).values({ year, lastSeq: 1 })
    .onConflictDoUpdate({ target: invoiceCounters.year, set: { lastSeq: sql`${invoiceCounters.lastSeq} + 1` } })
    .returning({ seq: invoiceCounters.lastSeq })
  return row!.seq
}

/** Draft → open: numbers the invoice, dates it, and e-mails the household (with the PDF attached). */
export async function issueInvoice(user: AuthUser, invoice: InvoiceRow, client: ClientRow) {
  if (!canIssue(invoice.status)) invoiceConflict(`This invoice is ${invoice.status}; only a draft can be issued.`)
  const { business } = await readInvoiceSettings()
  return invoiceWrite(async (tx) => {
    const row = await issueDraftInTx(tx, user.id, invoice.id, client, business)
    // Someone else issued or voided it first: roll the number back with the transaction.
    if (!row) invoiceConflict('This invoice was changed by someone else just now. Reload and try again.')
    return row
  })
}

/**
 * Issues one draft inside the caller's transaction (the office's button, a plan's deposit, the periodic job):
 * the next number of the year, today's date in the business's zone, the e-mail with the PDF, the audit entry.
 * Returns null when the invoice is no longer a draft (nothing is written then, and no number is used).
 */
export async function issueDraftInTx(tx: Tx, actorId: string | null, invoiceId: string, client: ClientRow, business: BusinessProfile) {
  const [current] = await tx.select().from(invoices).where(eq(invoices.id, invoiceId)).limit(1)
  if (!current || current.status !== 'draft') return null
  const issueDate = todayInTimeZone(business.timeZone)
  const year = Number(issueDate.slice(0, 4))
  const seq = await nextInvoiceSeq(tx, year)
  const number = formatInvoiceNumber('invoice', year, seq)
  const dueDate = addDays(issueDate, current.dueInDays)
  const frozen = await freezeDocument(tx, { kind: 'invoice', number, issueDate, dueDate, currency: current.currency, notes: current.notes, invoiceId, client, corrects: null })
  const [row] = await tx.update(invoices).set({
    status: 'open', number, numberYear: year, numberSeq: seq, issueDate, dueDate, issuedAt: new Date(), scheduledIssueOn: null, frozen,
  }).where(and(eq(invoices.id, invoiceId), eq(invoices.status, 'draft'))).returning()
  if (!row) return null
  for (const h of await householdHandlers(tx, client.id)) {
    await queueEmail(tx, {
      to: h.email, dedupeKey: `invoice-issued:${row.id}:${h.email}`,
      attachments: [{ kind: 'invoice-pdf', id: row.id }],
      ...composeEmail({
        subject: `Invoice ${number} from ${frozen.seller.tradingName || frozen.seller.name}`,
        greeting: `Hello ${h.name},`,
        paragraphs: [
          `Invoice ${number} for ${formatMoney(row.grossMinor, row.currency, business.locale)} is ready. It is due on ${row.dueDate}. The invoice is attached as a PDF.`,
          'You can see it and pay by card on your invoices page.',
        ],
        action: { label: 'See the invoice', url: appUrl(`/handler/invoices/${row.id}`) },
      }),
    })
  }
  await logAudit(tx, {
    actorId, action: 'invoice.issued', entityType: 'invoice', entityId: row.id, clientId: client.id,
    data: { name: `Invoice ${number}`, grossMinor: row.grossMinor, currency: row.currency, ...(actorId ? {} : { automatic: true }) },
  })
  return row
}

/** The invoice's PDF as a nodemailer attachment, rendered as the household sees it (used by the outbox at send time). */
export async function invoicePdfAttachment(invoiceId: string) {
  const [row] = await useDb().select({ invoice: invoices, client: clients }).from(invoices)
    .innerJoin(clients, eq(clients.id, invoices.clientId)).where(eq(invoices.id, invoiceId)).limit(1)
  if (!row) throw new Error(`Invoice ${invoiceId} to attach no longer exists`)
  const doc = await documentOf(row.invoice, row.client)
  const bytes = await renderInvoicePdf(doc, await pdfAssets(doc.seller.logoId))
  return { filename: `${(row.invoice.number ?? 'invoice').replace(/[^\w-]/g, '')}.pdf`, content: Buffer.from(bytes), contentType: 'application/pdf' }
}

/** Discards a draft (it never had a number, so no gap is left). Issued invoices are corrected by a credit note. */
export async function voidDraftInvoice(user: AuthUser, invoice: InvoiceRow) {
  if (!canVoid(invoice.status)) invoiceConflict(`This invoice is ${invoice.status}. An issued invoice is corrected with a credit note, not voided.`)
  return invoiceWrite(async (tx) => {
    const [row] = await tx.update(invoices).set({ status: 'void', voidedAt: new Date() })
      .where(and(eq(invoices.id, invoice.id), eq(invoices.status, 'draft'))).returning()
    if (!row) invoiceConflict('This invoice was changed by someone else just now. Reload and try again.')
    await logAudit(tx, { actorId: user.id, action: 'invoice.voided', entityType: 'invoice', entityId: row.id, clientId: row.clientId, data: { name: 'Draft invoice discarded' } })
    return row
  })
}

/**
 * Credits a whole issued invoice. An unpaid one becomes void and its credit note is applied against it; a paid one
 * keeps its payment and the credit note stays open as a refund owed to the household.
 */
export async function creditInvoice(user: AuthUser, invoice: InvoiceRow, client: ClientRow, reason: string) {
  if (!canCredit(invoice.kind, invoice.status)) invoiceConflict(`This ${invoice.kind === 'invoice' ? `invoice is ${invoice.status}` : 'is a credit note'}; only an open or paid invoice can be credited.`)
  if (invoice.status === 'open' && invoice.paidMinor > 0) invoiceConflict('This invoice is part paid. Record the rest of the payment first, then credit it.')
  const { business } = await readInvoiceSettings()
  const issueDate = todayInTimeZone(business.timeZone)
  const year = Number(issueDate.slice(0, 4))
  return invoiceWrite(async (tx) => {
    const lines = await tx.select().from(invoiceLines).where(eq(invoiceLines.invoiceId, invoice.id)).orderBy(asc(invoiceLines.position))
    const credit = creditLines(lines)
    const totals = invoiceTotalsForIssue(credit, 'credit_note')
    const already = await tx.select({ id: invoices.id }).from(invoices).where(eq(invoices.creditsInvoiceId, invoice.id)).limit(1)
    if (already.length) invoiceConflict('This invoice already has a credit note.')
    const wasOpen = invoice.status === 'open'
    if (wasOpen) {
      const [voided] = await tx.update(invoices).set({ status: 'void', voidedAt: new Date() })
        .where(and(eq(invoices.id, invoice.id), eq(invoices.status, 'open'), eq(invoices.paidMinor, 0))).returning()
      if (!voided) invoiceConflict('This invoice was changed by someone else just now. Reload and try again.')
    }
    const seq = await nextInvoiceSeq(tx, year)
    const number = formatInvoiceNumber('credit_note', year, seq)
    const [note] = await tx.insert(invoices).values({
      clientId: client.id, kind: 'credit_note', status: wasOpen ? 'paid' : 'open', currency: invoice.currency,
      number, numberYear: year, numberSeq: seq, issueDate, dueDate: issueDate, dueInDays: 0,
      netMinor: totals.netMinor, taxMinor: totals.taxMinor, grossMinor: totals.grossMinor,
      notes: reason, creditsInvoiceId: invoice.id, createdById: user.id, issuedAt: new Date(), paidAt: wasOpen ? new Date() : null,
    }).returning()
    await insertLines(tx, note!.id, credit)
    const frozen = await freezeDocument(tx, {
      kind: 'credit_note', number, issueDate, dueDate: null, currency: invoice.currency, notes: reason, invoiceId: note!.id, client,
      corrects: { number: invoice.number!, issueDate: invoice.issueDate },
    })
    await tx.update(invoices).set({ frozen }).where(eq(invoices.id, note!.id))
    await logAudit(tx, {
      actorId: user.id, action: 'invoice.credited', entityType: 'invoice', entityId: invoice.id, clientId: client.id,
      data: { name: `Credit note ${number} for invoice ${invoice.number}`, creditNoteId: note!.id, reason },
    })
    return note!
  })
}

/** Money received outside the card flow (bank transfer, cash): never more than is owed; a receipt goes out. */
export async function recordManualPayment(user: AuthUser, invoice: InvoiceRow, client: ClientRow, input: ManualPaymentInput) {
  if (invoice.kind !== 'invoice' || invoice.status !== 'open') invoiceConflict(`This ${invoice.kind === 'invoice' ? `invoice is ${invoice.status}` : 'is a credit note'}; payments are recorded only against an open invoice.`)
  const owed = balanceDue(invoice.grossMinor, invoice.paidMinor)
  if (input.amountMinor > owed) invoiceRuleError({ amountMinor: `That is more than is owed (${formatMoney(owed, invoice.currency)}).` })
  return invoiceWrite(async (tx) => {
    const paidMinor = invoice.paidMinor + input.amountMinor
    const full = paidMinor === invoice.grossMinor
    // Guarded on the amount read before: a concurrent payment makes this update match nothing.
    const [row] = await tx.update(invoices).set({ paidMinor, status: full ? 'paid' : 'open', paidAt: full ? new Date() : null })
      .where(and(eq(invoices.id, invoice.id), eq(invoices.status, 'open'), eq(invoices.paidMinor, invoice.paidMinor))).returning()
    if (!row) invoiceConflict('This invoice was changed by someone else just now. Reload and try again.')
    const [payment] = await tx.insert(invoicePayments).values({
      invoiceId: invoice.id, amountMinor: input.amountMinor, method: input.method, reference: input.reference,
      receivedOn: input.receivedOn, recordedById: user.id, receiptNumber: await nextReceiptNumber(tx, invoice),
    }).returning()
    await queueInvoiceReceipt(tx, row, client, payment!)
    await logAudit(tx, {
      actorId: user.id, action: 'invoice.payment-recorded', entityType: 'invoice', entityId: invoice.id, clientId: client.id,
      data: { name: `Payment on ${invoice.number}`, amountMinor: input.amountMinor, method: input.method },
    })
    return { invoice: row, payment: payment! }
  })
}

/** The next payment's plain receipt number on an invoice (inside the caller's write transaction). */
export async function nextReceiptNumber(tx: Tx, invoice: InvoiceRow): Promise<string> {
  const [row] = await tx.select({ n: sql<number>`count(*)` }).from(invoicePayments).where(eq(invoicePayments.invoiceId, invoice.id))
  return receiptNumberFor(invoice.number ?? invoice.id, Number(row?.n ?? 0) + 1)
}

/** The receipt e-mail for one payment, once (keyed on the payment): what was paid for, line by line, and the PDF. */
export async function queueInvoiceReceipt(tx: Tx, invoice: InvoiceRow, client: ClientRow, payment: typeof invoicePayments.$inferSelect) {
  const { business } = await readInvoiceSettings(tx)
  const money = (m: number) => formatMoney(m, invoice.currency, business.locale)
  const amount = money(payment.amountMinor)
  const left = balanceDue(invoice.grossMinor, invoice.paidMinor)
  const lines = await tx.select().from(invoiceLines).where(eq(invoiceLines.invoiceId, invoice.id)).orderBy(asc(invoiceLines.position))
  const receipt = payment.receiptNumber ?? receiptNumberFor(invoice.number ?? invoice.id, 1)
  for (const h of await householdHandlers(tx, client.id)) {
    await queueEmail(tx, {
      to: h.email, dedupeKey: `invoice-receipt:${payment.id}:${h.email}`,
      attachments: [{ kind: 'receipt-pdf', id: payment.id }],
      ...composeEmail({
        subject: `Receipt for ${amount} — invoice ${invoice.number}`,
        greeting: `Hello ${h.name},`,
        paragraphs: [
          `Thank you: we received ${amount} on ${payment.receivedOn} against invoice ${invoice.number}. Your receipt number is ${receipt}; the receipt is attached as a PDF.`,
          `Invoice ${invoice.number}: ${lines.map(l => `${l.quantity} × ${l.description}, ${money(l.grossMinor)}`).join('; ')}. Total ${money(invoice.grossMinor)}.`,
          left > 0 ? `${money(left)} is still to pay on this invoice.` : 'This invoice is now paid in full.',
        ],
        action: { label: 'See your invoices', url: appUrl(`/handler/invoices/${invoice.id}`) },
      }),
    })
  }
}

/** One payment's receipt, as a document: the invoice as issued, the payment, and what was paid up to it. */
export async function receiptDocument(invoice: InvoiceRow, client: ClientRow, paymentId: string): Promise<ReceiptDocument | null> {
  const db = useDb()
  const payments = await db.select().from(invoicePayments).where(eq(invoicePayments.invoiceId, invoice.id)).orderBy(asc(invoicePayments.createdAt), asc(invoicePayments.id))
  const at = payments.findIndex(p => p.id === paymentId)
  if (at < 0) return null
  const p = payments[at]!
  const paidToDateMinor = payments.slice(0, at + 1).reduce((a, x) => a + x.amountMinor, 0)
  return {
    receiptNumber: p.receiptNumber ?? receiptNumberFor(invoice.number ?? invoice.id, at + 1), receivedOn: p.receivedOn, method: p.method,
    amountMinor: p.amountMinor, paidToDateMinor, balanceMinor: balanceDue(invoice.grossMinor, paidToDateMinor), invoice: await documentOf(invoice, client),
  }
}

/** The receipt PDF as a nodemailer attachment (the outbox renders it when the message is sent). */
export async function receiptPdfAttachment(paymentId: string) {
  const [row] = await useDb().select({ invoice: invoices, client: clients }).from(invoicePayments)
    .innerJoin(invoices, eq(invoices.id, invoicePayments.invoiceId)).innerJoin(clients, eq(clients.id, invoices.clientId))
    .where(eq(invoicePayments.id, paymentId)).limit(1)
  if (!row) throw new Error(`Payment ${paymentId} to attach no longer exists`)
  const doc = await receiptDocument(row.invoice, row.client, paymentId)
  const bytes = await renderReceiptPdf(doc!, await pdfAssets(doc!.invoice.seller.logoId))
  return { filename: `${doc!.receiptNumber.replace(/[^\w-]/g, '')}.pdf`, content: Buffer.from(bytes), contentType: 'application/pdf' }
}

/** The roster column: what each client owes on open invoices, one query for the whole page. */
export async function invoiceBalances(clientIds: string[]) {
  const out = new Map<string, { owedMinor: number, currency: string, overdue: boolean }>()
  if (!clientIds.length) return out
  const { business } = await readInvoiceSettings()
  const today = todayInTimeZone(business.timeZone)
  const rows = await useDb().select({
    clientId: invoices.clientId, currency: invoices.currency,
    owed: sql<number>`sum(${invoices.grossMinor} - ${invoices.paidMinor})`,
    overdue: sql<number>`max(case when ${invoices.dueDate} < ${today} then 1 else 0 end)`,
  }).from(invoices).where(and(inArray(invoices.clientId, clientIds), eq(invoices.status, 'open'), eq(invoices.kind, 'invoice')))
    .groupBy(invoices.clientId, invoices.currency)
  for (const r of rows) out.set(r.clientId, { owedMinor: Number(r.owed), currency: r.currency, overdue: Number(r.overdue) === 1 })
  return out
}
