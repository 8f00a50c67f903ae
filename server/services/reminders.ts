// The reminder job: appointment reminders (with the visit as an .ics file), homework due tomorrow, samples to renew
// soon and invoices falling due. Each e-mail has a dedupe key, so it is written to the outbox once however often the
// job runs and on however many instances; the office switches each kind (policy), each person their own (account).
import { and, asc, eq, gt, isNull, lte, min } from 'drizzle-orm'
import { appointments, clients, homeworkAssignments, invoices, reminderPreferences, samples } from '../database/schema'
import type { ReminderPreferencesInput } from '../../shared/schemas/schedule'
import type { WorkingDayPolicy } from '../../shared/schemas/settings-working-day'
import { REMINDER_KINDS_FOR, REMINDER_KIND_LABELS, reminderEnabled, type ReminderKind } from '../../shared/utils/reminders'
import type { AuthUser } from '../utils/authz'
import { APPOINTMENT_KIND_LABELS, visitWhenText } from '../../shared/utils/schedule'
import { addDays } from '../../shared/utils/invoices'
import { dayInZone } from '../../shared/utils/homework'
import { formatMoney } from '../../shared/utils/money'

export interface ReminderRun { appointments: number, homework: number, samples: number, invoices: number }


export async function runReminders(now = new Date()): Promise<ReminderRun> {
  const db = useDb()
  const policy = await readWorkingDayPolicy(db)
  const zone = await businessTimeZone(db)
  const today = dayInZone(zone, now)
  const run: ReminderRun = { appointments: 0, homework: 0, samples: 0, invoices: 0 }

  if (policy.appointmentReminders) {
    const due = await appointmentQuery(db).where(and(eq(appointments.status, 'scheduled'), gt(appointments.startsAt, now), lte(appointments.startsAt, new Date(now.getTime() + policy.appointmentHoursBefore * 3_600_000))))
    for (const a of due) {
      await db.transaction(async (tx) => {
        for (const r of await reminderRecipients(tx, a.clientId, 'appointment')) {
          await queueEmail(tx, {
            to: r.email,
            // The start is in the key: a visit moved after its reminder is reminded again at its new time.
            dedupeKey: `appointment-reminder:${a.id}:${a.startsAt.getTime()}:${r.id}`,
            ...composeEmail({
              subject: `Reminder: ${APPOINTMENT_KIND_LABELS[a.kind]} ${visitWhenText(a.startsAt, a.timeZone)}`,
              greeting: `Hello ${r.name},`,
              paragraphs: [
                `A reminder of your ${APPOINTMENT_KIND_LABELS[a.kind].toLowerCase()} with ${a.trainerName}${a.dogName ? ` for ${a.dogName}` : ''}: ${visitWhenText(a.startsAt, a.timeZone)}${a.place ? `, ${a.place}` : ''}.`,
                ...(a.householdNotes ? [`Notes from your trainer: ${a.householdNotes}`] : []),
                'Open the attached calendar file to add it to your phone\'s calendar. If you cannot make it, write to your trainer in Forescent.',
              ],
              action: { label: 'See your appointments', url: appUrl('/handler/calendar') },
            }),
            attachments: [{ kind: 'appointment-ics', id: a.id }],
          })
          run.appointments++
        }
      })
    }
  }

  if (policy.homeworkDueReminders) {
    const tomorrow = addDays(today, 1)
    const due = await db.select({ id: homeworkAssignments.id, clientId: homeworkAssignments.clientId, title: homeworkAssignments.title, dueDay: homeworkAssignments.dueDay })
      .from(homeworkAssignments).where(and(eq(homeworkAssignments.state, 'open'), eq(homeworkAssignments.dueDay, tomorrow)))
    for (const h of due) {
      await db.transaction(async (tx) => {
        for (const r of await reminderRecipients(tx, h.clientId, 'homework-due')) {
          await queueEmail(tx, {
            to: r.email,
            dedupeKey: `homework-due:${h.id}:${h.dueDay}:${r.id}`,
            ...composeEmail({ subject: `Homework due tomorrow: ${h.title}`, greeting: `Hello ${r.name},`, paragraphs: [`"${h.title}" is due tomorrow. Film the session and send it from the homework page when you can.`], action: { label: 'Open the homework', url: appUrl(`/handler/homework/assignments/${h.id}`) } }),
          })
          run.homework++
        }
      })
    }
  }

  if (policy.sampleRenewalReminders) {
    const samplePolicyNow = await samplePolicy(db)
    const renewMs = samplePolicyNow.renewAfterDays * 86_400_000
    // Samples reaching their renewal day within the next N days (not yet past it), per household: one e-mail per
    // household and earliest renewal day.
    const soon = await db.select({ clientId: samples.clientId, firstCollected: min(samples.collectedAt) }).from(samples)
      .innerJoin(clients, eq(clients.id, samples.clientId))
      .where(and(isNull(samples.discardedAt), gt(samples.collectedAt, new Date(now.getTime() - renewMs)), lte(samples.collectedAt, new Date(now.getTime() - renewMs + policy.sampleRenewalDays * 86_400_000))))
      .groupBy(samples.clientId)
    for (const s of soon) {
      const renewOn = dayInZone(zone, new Date(new Date(s.firstCollected!).getTime() + renewMs))
      await db.transaction(async (tx) => {
        for (const r of await reminderRecipients(tx, s.clientId, 'sample-renewal')) {
          await queueEmail(tx, {
            to: r.email,
            dedupeKey: `sample-renewal:${s.clientId}:${renewOn}:${r.id}`,
            ...composeEmail({ subject: 'Scent samples to renew soon', greeting: `Hello ${r.name},`, paragraphs: [`Some of your frozen samples reach their renewal day from ${renewOn}. Plan a fresh collection under the usual protocol (clean hands, nothing to eat or drink beforehand as your trainer taught you) so the bank stays healthy.`, 'Saliva samples are biological material: handle them with clean hands and keep them in their own freezer compartment.'], action: { label: 'Open the sample bank', url: appUrl(`/handler/samples/${s.clientId}`) } }),
          })
          run.samples++
        }
      })
    }
  }

  if (policy.invoiceDueReminders) {
    const dueOn = addDays(today, policy.invoiceDueDays)
    const due = await db.select({ id: invoices.id, clientId: invoices.clientId, number: invoices.number, dueDate: invoices.dueDate, grossMinor: invoices.grossMinor, paidMinor: invoices.paidMinor, currency: invoices.currency })
      .from(invoices).where(and(eq(invoices.status, 'open'), eq(invoices.dueDate, dueOn))).orderBy(asc(invoices.dueDate))
    for (const i of due) {
      await db.transaction(async (tx) => {
        for (const r of await reminderRecipients(tx, i.clientId, 'invoice-due')) {
          await queueEmail(tx, {
            to: r.email,
            dedupeKey: `invoice-due:${i.id}:${i.dueDate}:${r.id}`,
            ...composeEmail({ subject: `Invoice ${i.number} is due on ${i.dueDate}`, greeting: `Hello ${r.name},`, paragraphs: [`Invoice ${i.number} (${formatMoney(i.grossMinor - i.paidMinor, i.currency)} to pay) is due on ${i.dueDate}. You can pay it by card from your invoices page.`], action: { label: 'See the invoice', url: appUrl(`/handler/invoices/${i.id}`) } }),
          })
          run.invoices++
        }
      })
    }
  }
  return run
}

const OFFICE_SWITCH: Record<ReminderKind, keyof WorkingDayPolicy> = {
  'appointment': 'appointmentReminders',
  'homework-due': 'homeworkDueReminders',
  'sample-renewal': 'sampleRenewalReminders',
  'invoice-due': 'invoiceDueReminders',
  'messages': 'messageNotices',
}

/** The kinds that concern this person, each with the office's switch and their own choice. */
export async function reminderChoices(user: AuthUser) {
  const db = useDb()
  const [policy, own] = await Promise.all([
    readWorkingDayPolicy(db),
    db.select().from(reminderPreferences).where(eq(reminderPreferences.userId, user.id)),
  ])
  const mine = new Map(own.map(o => [o.kind, o.enabled]))
  return {
    kinds: REMINDER_KINDS_FOR[user.role].map(kind => ({
      kind, label: REMINDER_KIND_LABELS[kind],
      officeOn: !!policy[OFFICE_SWITCH[kind]],
      enabled: reminderEnabled(kind, !!policy[OFFICE_SWITCH[kind]], mine.get(kind)),
      own: mine.get(kind) ?? true,
    })),
  }
}

export async function saveReminderChoices(user: AuthUser, input: ReminderPreferencesInput) {
  const allowed = new Set<ReminderKind>(REMINDER_KINDS_FOR[user.role])
  const entries = (Object.entries(input) as [ReminderKind, boolean | undefined][]).filter(([, v]) => v !== undefined)
  const wrong = entries.filter(([k]) => !allowed.has(k)).map(([k]) => k)
  if (wrong.length) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: `These reminders do not concern your account: ${wrong.join(', ')}.`, data: { fieldErrors: Object.fromEntries(wrong.map(k => [k, 'Not for your account.'])) } })
  }
  await useDb().transaction(async (tx) => {
    for (const [kind, enabled] of entries) {
      await tx.insert(reminderPreferences).values({ userId: user.id, kind, enabled: enabled! })
        .onConflictDoUpdate({ target: [reminderPreferences.userId, reminderPreferences.kind], set: { enabled: enabled! } })
    }
    await logAudit(tx, { actorId: user.id, action: 'reminders.chosen', entityType: 'user', entityId: user.id, data: Object.fromEntries(entries) })
  })
  return reminderChoices(user)
}
