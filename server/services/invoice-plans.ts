// Fee schedules per programme template, the invoices created from one when a client's programme starts (or by hand),
// the periodic work on invoices (issuing scheduled instalments, overdue reminders) and revenue per month.
import { and, asc, eq, gte, lte, sql } from 'drizzle-orm'
import { clients, feeSchedules, invoiceLines, invoicePayments, invoices, programmeTemplates } from '../database/schema'
import type { FeeScheduleInput } from '../../shared/schemas/fee-schedules'
import { REMINDER_POLICY_DEFAULTS, REMINDER_POLICY_KEY, reminderPolicySchema } from '../../shared/schemas/settings-invoices'
import { buildFeePlan, lastMonths, nextReminderDue, revenueByMonth } from '../../shared/utils/fee-plan'
import { addDays, balanceDue, daysOverdue, invoiceTotalsForIssue } from '../../shared/utils/invoices'
import { formatMoney, lineTotals } from '../../shared/utils/money'
import { todayInTimeZone } from '../../shared/utils/dogs'
import type { AuthUser } from '../utils/authz'
import { issueDraftInTx, readInvoiceSettings } from './invoices'
import { householdHandlers } from './clients'

type ClientRow = typeof clients.$inferSelect
export type FeeScheduleRow = typeof feeSchedules.$inferSelect

function planError(statusCode: 409 | 422, message: string, fieldErrors?: Record<string, string>): never {
  throw createError({ statusCode, statusMessage: statusCode === 409 ? 'Conflict' : 'Unprocessable Content', message, data: fieldErrors ? { fieldErrors } : undefined })
}

/** Every programme template with its fee schedule (or null), and the business's currency for a new one. */
export async function listFeeSchedules() {
  const db = useDb()
  const [{ business, policy }, rows] = await Promise.all([
    readInvoiceSettings(db),
    db.select({ template: { id: programmeTemplates.id, name: programmeTemplates.name, isDefault: programmeTemplates.isDefault }, schedule: feeSchedules })
      .from(programmeTemplates).leftJoin(feeSchedules, eq(feeSchedules.templateId, programmeTemplates.id))
      .orderBy(sql`${programmeTemplates.isDefault} desc`, asc(programmeTemplates.name)),
  ])
  return {
    rows: rows.map(r => ({ ...r.template, schedule: r.schedule })),
    currency: business.currency, locale: business.locale, paymentTermsDays: policy.paymentTermsDays,
    today: todayInTimeZone(business.timeZone),
  }
}

/** Creates or replaces a template's fee schedule. Invoices already created from it keep their own amounts. */
export async function saveFeeSchedule(user: AuthUser, templateId: string, input: FeeScheduleInput) {
  return useDb().transaction(async (tx) => {
    const [template] = await tx.select({ id: programmeTemplates.id, name: programmeTemplates.name }).from(programmeTemplates).where(eq(programmeTemplates.id, templateId)).limit(1)
    if (!template) notFound('programme template')
    const values = { currency: input.currency, taxRateBasisPoints: input.taxRateBasisPoints, depositMinor: input.depositMinor, instalmentCount: input.instalmentCount, intervalMonths: input.intervalMonths, lines: input.lines, updatedById: user.id }
    const [row] = await tx.insert(feeSchedules).values({ templateId, ...values })
      .onConflictDoUpdate({ target: feeSchedules.templateId, set: { ...values, updatedAt: new Date() } }).returning()
    await logAudit(tx, { actorId: user.id, action: 'fee-schedule.saved', entityType: 'fee-schedule', entityId: row!.id, data: { name: `Fees for ${template.name}`, templateId, ...values, updatedById: undefined } })
    return row!
  })
}

/**
 * Creates a client's invoices from a template's plan, in one transaction: each part once only (unique on client,
 * schedule and part). Parts due on or before today (the deposit, normally) are issued and e-mailed at once; later
 * instalments wait as drafts with their issue date, for the periodic job to issue on the day.
 * `whenMissing: 'skip'` (a programme starting) returns null when the template has no schedule or the plan exists.
 */
export async function createPlanInvoices(actor: AuthUser, client: ClientRow, templateId: string, startDate: string, opts: { whenMissing: 'skip' | 'refuse' }) {
  const db = useDb()
  const [schedule] = await db.select().from(feeSchedules).where(eq(feeSchedules.templateId, templateId)).limit(1)
  if (!schedule) {
    if (opts.whenMissing === 'skip') return null
    planError(422, 'This programme template has no fee schedule yet. Set one up under Fee schedules first.', { templateId: 'This template has no fee schedule yet.' })
  }
  const { business, policy } = await readInvoiceSettings(db)
  let plan
  try { plan = buildFeePlan(schedule, startDate) }
  catch (e) { planError(422, `The fee schedule cannot be used: ${(e as Error).message}`) }
  const today = todayInTimeZone(business.timeZone)
  const [template] = await db.select({ name: programmeTemplates.name }).from(programmeTemplates).where(eq(programmeTemplates.id, templateId)).limit(1)
  try {
    return await db.transaction(async (tx) => {
      const existing = await tx.select({ id: invoices.id }).from(invoices).where(and(eq(invoices.clientId, client.id), eq(invoices.feeScheduleId, schedule.id))).limit(1)
      if (existing.length) {
        if (opts.whenMissing === 'skip') return null
        planError(409, 'Invoices from this plan already exist for this household. Draft any extra invoice by hand.')
      }
      const created: Array<typeof invoices.$inferSelect> = []
      for (const part of plan) {
        const totals = invoiceTotalsForIssue(part.lines, 'invoice')
        const [inv] = await tx.insert(invoices).values({
          clientId: client.id, kind: 'invoice', status: 'draft', currency: schedule.currency,
          netMinor: totals.netMinor, taxMinor: totals.taxMinor, grossMinor: totals.grossMinor,
          dueInDays: policy.paymentTermsDays, notes: `${template?.name ?? 'Programme'}: ${part.label.toLowerCase()}.`, createdById: actor.id,
          feeScheduleId: schedule.id, planPart: part.part, scheduledIssueOn: part.issueOn,
        }).returning()
        await tx.insert(invoiceLines).values(part.lines.map((l, i) => ({
          invoiceId: inv!.id, position: i + 1, description: l.description, unitMinor: l.unitMinor, quantity: l.quantity,
          taxRateBasisPoints: l.taxRateBasisPoints, ...lineTotals(l),
        })))
        const issued = part.issueOn <= today ? await issueDraftInTx(tx, actor.id, inv!.id, client, business) : null
        created.push(issued ?? inv!)
      }
      await logAudit(tx, {
        actorId: actor.id, action: 'invoice.plan-created', entityType: 'client', entityId: client.id, clientId: client.id,
        data: { name: `Invoices from the ${template?.name ?? 'programme'} fee plan`, feeScheduleId: schedule.id, startDate, count: created.length },
      })
      return created
    })
  }
  catch (err) {
    // Two requests at once: the unique index lets one through; the other finds the plan already there.
    if (/UNIQUE constraint failed: invoices\.client_id/.test(String((err as Error)?.message ?? '')) || /UNIQUE constraint failed: invoices\.client_id/.test(String((err as { cause?: Error })?.cause?.message ?? ''))) {
      if (opts.whenMissing === 'skip') return null
      planError(409, 'Invoices from this plan already exist for this household. Draft any extra invoice by hand.')
    }
    throw err
  }
}

/**
 * What starting a programme from a template would invoice and e-mail, before anything is written: the parts of its
 * plan due today (issued and e-mailed at once) and those issued on later days, with their amounts and who is e-mailed.
 */
export async function previewProgrammeBilling(client: ClientRow, templateId: string) {
  const db = useDb()
  const [[template], [schedule], { business }] = await Promise.all([
    db.select({ id: programmeTemplates.id, name: programmeTemplates.name, archivedAt: programmeTemplates.archivedAt }).from(programmeTemplates).where(eq(programmeTemplates.id, templateId)).limit(1),
    db.select().from(feeSchedules).where(eq(feeSchedules.templateId, templateId)).limit(1),
    readInvoiceSettings(db),
  ])
  if (!template || template.archivedAt) planError(422, 'Choose one of the programme templates.', { templateId: 'Choose one of the programme templates.' })
  const today = todayInTimeZone(business.timeZone)
  const recipients = (await householdHandlers(db, client.id)).map(h => h.email)
  if (!schedule) return { template: template.name, hasSchedule: false, alreadyInvoiced: false, currency: business.currency, locale: business.locale, today, recipients, parts: [] }
  const existing = await db.select({ id: invoices.id }).from(invoices).where(and(eq(invoices.clientId, client.id), eq(invoices.feeScheduleId, schedule.id))).limit(1)
  let plan
  try { plan = buildFeePlan(schedule, today) }
  catch (e) { planError(422, `The fee schedule cannot be used: ${(e as Error).message}`) }
  return {
    template: template.name, hasSchedule: true, alreadyInvoiced: existing.length > 0, currency: schedule.currency, locale: business.locale, today, recipients,
    parts: plan.map(p => ({ part: p.part, label: p.label, issueOn: p.issueOn, now: p.issueOn <= today, grossMinor: invoiceTotalsForIssue(p.lines, 'invoice').grossMinor })),
  }
}

/** A programme has just started: create its plan's invoices if the template has a schedule. Never fails the start. */
export async function createPlanInvoicesOnProgrammeStart(actor: AuthUser, client: ClientRow, templateId: string) {
  try {
    const { business } = await readInvoiceSettings()
    return await createPlanInvoices(actor, client, templateId, todayInTimeZone(business.timeZone), { whenMissing: 'skip' })
  }
  catch (err) {
    // The programme stands; the office can still "create invoices from the plan" on the client's invoices page.
    logFailure('invoices.plan-on-start', 'Plan invoices on programme start failed.', err)
    return null
  }
}

/** Plan drafts whose issue date has come, issued one transaction each (numbered and e-mailed). */
async function issueScheduledDrafts(today: string, limit: number) {
  const db = useDb()
  const { business } = await readInvoiceSettings(db)
  const due = await db.select({ invoice: invoices, client: clients }).from(invoices).innerJoin(clients, eq(clients.id, invoices.clientId))
    .where(and(eq(invoices.status, 'draft'), lte(invoices.scheduledIssueOn, today))).orderBy(asc(invoices.scheduledIssueOn), asc(invoices.createdAt)).limit(limit)
  let issued = 0
  for (const r of due) {
    try {
      const row = await db.transaction(tx => issueDraftInTx(tx, null, r.invoice.id, r.client, business))
      if (row) issued++
    }
    catch (err) {
      // The business identity is incomplete (or another refusal): the draft waits for the next run; nothing is written.
      logFailure('invoices.scheduled-issue', 'A scheduled instalment could not be issued.', err)
      if ((err as { statusCode?: number }).statusCode === 422) break
    }
  }
  return issued
}

/**
 * Overdue reminders, oldest debt first: each open invoice gets the next reminder it has not had once its day has come
 * and an interval has passed since the last (`nextReminderDue`), up to the policy's maximum; each once (guarded and
 * deduplicated).
 */
async function sendOverdueReminders(today: string, limit: number) {
  const db = useDb()
  const [{ business }, policy] = await Promise.all([
    readInvoiceSettings(db),
    readSetting(REMINDER_POLICY_KEY, reminderPolicySchema, REMINDER_POLICY_DEFAULTS, db),
  ])
  if (!policy.enabled) return 0
  const latestDue = addDays(today, -policy.firstAfterDaysOverdue)
  const rows = await db.select({ invoice: invoices, client: clients }).from(invoices).innerJoin(clients, eq(clients.id, invoices.clientId))
    .where(and(eq(invoices.status, 'open'), eq(invoices.kind, 'invoice'), lte(invoices.dueDate, latestDue), sql`${invoices.remindersSent} < ${policy.maxReminders}`))
    .orderBy(asc(invoices.dueDate)).limit(limit)
  let reminded = 0
  for (const { invoice, client } of rows) {
    const k = nextReminderDue({
      daysOverdue: daysOverdue(invoice.dueDate!, today),
      remindersSent: invoice.remindersSent,
      daysSinceLastReminder: invoice.lastRemindedAt ? daysOverdue(todayInTimeZone(business.timeZone, invoice.lastRemindedAt), today) : null,
    }, policy)
    if (k === null) continue
    const owed = balanceDue(invoice.grossMinor, invoice.paidMinor)
    if (owed < 1) continue
    const done = await db.transaction(async (tx) => {
      // Guarded on the count read before: another instance's run makes this match nothing.
      const [row] = await tx.update(invoices).set({ remindersSent: k, lastRemindedAt: new Date() })
        .where(and(eq(invoices.id, invoice.id), eq(invoices.status, 'open'), eq(invoices.remindersSent, invoice.remindersSent))).returning({ id: invoices.id })
      if (!row) return false
      const amount = formatMoney(owed, invoice.currency, business.locale)
      for (const h of await householdHandlers(tx, client.id)) {
        await queueEmail(tx, {
          to: h.email, dedupeKey: `invoice-reminder:${invoice.id}:${k}:${h.email}`,
          ...composeEmail({
            subject: `Reminder: invoice ${invoice.number} is overdue`,
            greeting: `Hello ${h.name},`,
            paragraphs: [
              `Invoice ${invoice.number} was due on ${invoice.dueDate}, and ${amount} is still to pay.`,
              'You can pay by card on your invoices page, or by bank transfer quoting the invoice number. If you have paid in the last few days, thank you, and please ignore this reminder.',
            ],
            action: { label: 'See the invoice', url: appUrl(`/handler/invoices/${invoice.id}`) },
          }),
        })
      }
      await logAudit(tx, { actorId: null, action: 'invoice.reminded', entityType: 'invoice', entityId: invoice.id, clientId: client.id, data: { name: `Reminder ${k} for ${invoice.number}`, reminder: k, owedMinor: owed } })
      return true
    })
    if (done) reminded++
  }
  return reminded
}

let running: Promise<{ issued: number, reminded: number }> | null = null

/** The periodic invoice work (server/plugins/invoice-schedule.ts, and the admin's "run now"): one run at a time. */
export function runInvoiceSchedule(limit = 200): Promise<{ issued: number, reminded: number }> {
  running ??= (async () => {
    try {
      const { business } = await readInvoiceSettings()
      const today = todayInTimeZone(business.timeZone)
      const issued = await issueScheduledDrafts(today, limit)
      const reminded = await sendOverdueReminders(today, limit * 5)
      return { issued, reminded }
    }
    finally { running = null }
  })()
  return running
}

/** Payments received per month over the last 12 months, per currency, by the day they were received. */
export async function invoiceRevenue() {
  const db = useDb()
  const { business } = await readInvoiceSettings(db)
  const today = todayInTimeZone(business.timeZone)
  const from = `${lastMonths(today, 12)[0]}-01`
  const rows = await db.select({ receivedOn: invoicePayments.receivedOn, amountMinor: invoicePayments.amountMinor, currency: invoices.currency })
    .from(invoicePayments).innerJoin(invoices, eq(invoices.id, invoicePayments.invoiceId))
    .where(and(gte(invoicePayments.receivedOn, from), eq(invoices.kind, 'invoice')))
  return { ...revenueByMonth(rows, today, 12), locale: business.locale, timeZone: business.timeZone }
}
