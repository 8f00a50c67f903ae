// The demo households' programme fees (used by seed-data.ts). Invented amounts: a deposit and monthly instalments,
// some paid by bank transfer, one open and current, one overdue, one draft. Numbers run per year without gaps.
// The default programme template has a fee schedule (deposit + 6 monthly instalments); the Fairweather and
// Achterberg invoices belong to its plan, with the instalments still to come waiting as scheduled drafts.
import { eq } from 'drizzle-orm'
import type { Database } from '../../server/database/client'
import * as s from '../../server/database/schema'
import { lineTotals } from '../../shared/utils/money'
import { formatInvoiceNumber } from '../../shared/utils/invoices'
import { addMonths, buildFeePlan, type FeeScheduleInput } from '../../shared/utils/fee-plan'
import { billingParty, freezeInvoice, receiptNumberFor } from '../../shared/utils/invoice-document'
import { BUSINESS_IDENTITY_KEY, type BusinessIdentity } from '../../shared/schemas/settings-identity'
import { INVOICE_POLICY_DEFAULTS } from '../../shared/schemas/settings-invoices'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

/** The invoice tables, children before clients, for the seed's delete list. */
export const INVOICE_TABLES_CHILD_FIRST = ['stripe_events', 'payment_problems', 'invoice_refunds', 'business_logos', 'invoice_payments', 'invoice_lines', 'invoices', 'invoice_counters', 'fee_schedules'] as const

const DAY = 86_400_000
// 20 %: the UK standard rate of VAT (GOV.UK, "VAT rates", from memory); the demo business is UK-registered.
const UK_STANDARD_VAT_BP = 2000

// The invented business's identity as its invoices print it. The IBAN is the example IBAN printed in the IBAN
// standard's documentation (ISO 13616, from memory): it passes the checksum and belongs to no real account here.
export const DEMO_IDENTITY: BusinessIdentity = {
  legalName: 'Larkspur Scent Partners Ltd', tradingName: 'Larkspur Scent Partners', addressLine1: '4 Orchard Yard', addressLine2: 'Millbrook Lane',
  town: 'Ashcombe', postcode: 'AC4 9LR', country: 'GB', vatNumber: 'GB 000 1111 22', companyNumber: '00011122',
  iban: 'GB82WEST12345698765432', bic: 'LARKGB21', bankAccountText: 'Sort code 00-11-22, account 00011122',
  paymentTerms: 'Payment within 14 days of the date of issue, by card online or by bank transfer.',
  email: 'office@larkspur.example', phone: '01632 960 123', // 01632 960xxx: a UK range kept for drama (Ofcom, from memory)
}

interface DemoInvoice {
  key: string
  client: string
  issuedDaysAgo: number | null // null: a draft
  dueInDays: number
  lines: Array<{ description: string, unitMinor: number, quantity: number, taxRateBasisPoints: number }>
  paidDaysAgo?: number
  planPart?: string
}

// Invented fees: deposit £600 + VAT, instalments £250 + VAT, an extra home visit £85 + VAT.
const DEMO: DemoInvoice[] = [
  { key: 'fair-deposit', planPart: 'deposit', client: 'fairweather', issuedDaysAgo: 140, dueInDays: 14, paidDaysAgo: 135, lines: [{ description: 'Programme deposit', unitMinor: 60000, quantity: 1, taxRateBasisPoints: UK_STANDARD_VAT_BP }] },
  { key: 'fair-1', planPart: 'instalment:1', client: 'fairweather', issuedDaysAgo: 40, dueInDays: 14, paidDaysAgo: 30, lines: [{ description: 'Programme instalment 1 of 6', unitMinor: 25000, quantity: 1, taxRateBasisPoints: UK_STANDARD_VAT_BP }] },
  { key: 'fair-2', planPart: 'instalment:2', client: 'fairweather', issuedDaysAgo: 6, dueInDays: 14, lines: [
    { description: 'Programme instalment 2 of 6', unitMinor: 25000, quantity: 1, taxRateBasisPoints: UK_STANDARD_VAT_BP },
    { description: 'Extra home visit', unitMinor: 8500, quantity: 1, taxRateBasisPoints: UK_STANDARD_VAT_BP },
  ] },
  { key: 'moreau-5', client: 'moreau', issuedDaysAgo: 50, dueInDays: 14, lines: [{ description: 'Programme instalment 5 of 6', unitMinor: 25000, quantity: 1, taxRateBasisPoints: UK_STANDARD_VAT_BP }] },
  { key: 'acht-deposit', planPart: 'deposit', client: 'achterberg', issuedDaysAgo: 9, dueInDays: 14, lines: [{ description: 'Programme deposit', unitMinor: 60000, quantity: 1, taxRateBasisPoints: UK_STANDARD_VAT_BP }] },
  { key: 'lind-visit', client: 'lindgren', issuedDaysAgo: null, dueInDays: 14, lines: [{ description: 'Extra home visit', unitMinor: 8500, quantity: 2, taxRateBasisPoints: UK_STANDARD_VAT_BP }] },
]

const isoDay = (d: Date) => d.toISOString().slice(0, 10)

// The default template's fees (invented): £2,100 + VAT, a £600 deposit, then six monthly instalments of £250.
export const DEFAULT_FEE_SCHEDULE: FeeScheduleInput = {
  lines: [{ description: 'Placement programme: training, sample-bank support and placement', unitMinor: 210000, taxRateBasisPoints: null }],
  taxRateBasisPoints: UK_STANDARD_VAT_BP, depositMinor: 60000, instalmentCount: 6, intervalMonths: 1,
}

export async function seedInvoices(tx: Tx, today: Date, seedId: (name: string) => string) {
  const scheduleId = seedId('fee-schedule:default')
  await tx.insert(s.feeSchedules).values({ id: scheduleId, templateId: seedId('template:default'), currency: 'GBP', ...DEFAULT_FEE_SCHEDULE, lines: [...DEFAULT_FEE_SCHEDULE.lines], updatedById: seedId('user:admin') })
  await tx.insert(s.businessSettings).values([
    { key: 'business', value: { name: 'Larkspur Scent Partners', timeZone: 'Europe/London', locale: 'en-GB', currency: 'GBP' } },
    { key: BUSINESS_IDENTITY_KEY, value: { ...DEMO_IDENTITY } },
  ])
  const seqByYear = new Map<number, number>()
  const ordered = [...DEMO].sort((a, b) => (b.issuedDaysAgo ?? -1) - (a.issuedDaysAgo ?? -1))
  for (const inv of ordered) {
    const id = seedId(`invoice:${inv.key}`)
    const totals = inv.lines.map(lineTotals)
    const sum = (k: 'netMinor' | 'taxMinor' | 'grossMinor') => totals.reduce((a, t) => a + t[k], 0)
    const issued = inv.issuedDaysAgo === null ? null : new Date(today.getTime() - inv.issuedDaysAgo * DAY)
    let number: string | null = null, year: number | null = null, seq: number | null = null
    if (issued) {
      year = issued.getUTCFullYear()
      seq = (seqByYear.get(year) ?? 0) + 1
      seqByYear.set(year, seq)
      number = formatInvoiceNumber('invoice', year, seq)
    }
    const paid = inv.paidDaysAgo !== undefined ? new Date(today.getTime() - inv.paidDaysAgo * DAY) : null
    await tx.insert(s.invoices).values({
      id, clientId: seedId(`client:${inv.client}`), kind: 'invoice', status: !issued ? 'draft' : paid ? 'paid' : 'open',
      number, numberYear: year, numberSeq: seq, currency: 'GBP',
      issueDate: issued ? isoDay(issued) : null, dueDate: issued ? isoDay(new Date(issued.getTime() + inv.dueInDays * DAY)) : null,
      netMinor: sum('netMinor'), taxMinor: sum('taxMinor'), grossMinor: sum('grossMinor'), paidMinor: paid ? sum('grossMinor') : 0,
      dueInDays: inv.dueInDays, createdById: seedId('user:admin'), issuedAt: issued, paidAt: paid,
      feeScheduleId: inv.planPart ? scheduleId : null, planPart: inv.planPart ?? null,
      createdAt: issued ?? today, updatedAt: paid ?? issued ?? today,
    })
    await tx.insert(s.invoiceLines).values(inv.lines.map((l, i) => ({ invoiceId: id, position: i + 1, ...l, ...totals[i]! })))
    if (issued && number) {
      // Frozen as issued, like every invoice the app issues.
      const [client] = await tx.select().from(s.clients).where(eq(s.clients.id, seedId(`client:${inv.client}`)))
      const issueDate = isoDay(issued)
      const frozen = freezeInvoice({
        kind: 'invoice', number, issueDate, dueDate: isoDay(new Date(issued.getTime() + inv.dueInDays * DAY)), currency: 'GBP', locale: 'en-GB',
        seller: { name: DEMO_IDENTITY.legalName, tradingName: DEMO_IDENTITY.tradingName, address: [DEMO_IDENTITY.addressLine1, DEMO_IDENTITY.addressLine2, DEMO_IDENTITY.town, DEMO_IDENTITY.postcode], country: 'GB', vatNumber: DEMO_IDENTITY.vatNumber, companyNumber: DEMO_IDENTITY.companyNumber, email: DEMO_IDENTITY.email, phone: DEMO_IDENTITY.phone, logoId: null },
        buyer: billingParty(client!, 'GB'),
        lines: inv.lines.map((l, i) => ({ ...l, ...totals[i]! })),
        payment: { terms: DEMO_IDENTITY.paymentTerms, iban: DEMO_IDENTITY.iban, bic: DEMO_IDENTITY.bic, bankAccountText: DEMO_IDENTITY.bankAccountText, reference: number },
        footer: INVOICE_POLICY_DEFAULTS.footer, notes: null, corrects: null,
      })
      await tx.update(s.invoices).set({ frozen }).where(eq(s.invoices.id, id))
    }
    if (paid) {
      await tx.insert(s.invoicePayments).values({
        invoiceId: id, amountMinor: sum('grossMinor'), method: 'bank_transfer', reference: `Transfer ${number}`, receiptNumber: receiptNumberFor(number!, 1),
        receivedOn: isoDay(paid), recordedById: seedId('user:admin'), createdAt: paid, updatedAt: paid,
      })
    }
  }
  for (const [year, lastSeq] of seqByYear) await tx.insert(s.invoiceCounters).values({ year, lastSeq })
  // The plan's instalments still to come: scheduled drafts, issued on their day by the periodic job (all in the future).
  const upcoming = [
    { client: 'fairweather', from: 3, startOn: addMonths(isoDay(new Date(today.getTime() - 6 * DAY)), -2) }, // instalment 2 was issued 6 days ago
    { client: 'achterberg', from: 1, startOn: isoDay(new Date(today.getTime() - 9 * DAY)) }, // the deposit was issued 9 days ago
  ]
  for (const u of upcoming) {
    for (const part of buildFeePlan(DEFAULT_FEE_SCHEDULE, u.startOn).slice(u.from)) {
      const id = seedId(`invoice:${u.client}:${part.part}`)
      const totals = part.lines.map(lineTotals)
      const sum = (k: 'netMinor' | 'taxMinor' | 'grossMinor') => totals.reduce((a, t) => a + t[k], 0)
      await tx.insert(s.invoices).values({
        id, clientId: seedId(`client:${u.client}`), kind: 'invoice', status: 'draft', currency: 'GBP',
        netMinor: sum('netMinor'), taxMinor: sum('taxMinor'), grossMinor: sum('grossMinor'), dueInDays: 14,
        notes: `Standard scent-alert programme: ${part.label.toLowerCase()}.`, createdById: seedId('user:admin'),
        feeScheduleId: scheduleId, planPart: part.part, scheduledIssueOn: part.issueOn, createdAt: today, updatedAt: today,
      })
      await tx.insert(s.invoiceLines).values(part.lines.map(({ allocatedTaxMinor: _shared, ...l }, i) => ({ invoiceId: id, position: i + 1, ...l, ...totals[i]! })))
    }
  }
}
