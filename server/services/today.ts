// "What needs me now": the first screen of each role. Every list is computed for the person's own households only,
// with one query per kind (the roster's providers reused for the trainer), and each item carries where to act.
import { and, asc, count, eq, gte, isNull, lt, notInArray, sql } from 'drizzle-orm'
import { appointments, auditLog, clients, diaryEntries, dogs, homeworkAssignments, homeworkVideos, invitations, invoicePayments, invoices, messages, trainingSessions, users } from '../database/schema'
import { REMINDER_POLICY_DEFAULTS, REMINDER_POLICY_KEY, reminderPolicySchema } from '../../shared/schemas/settings-invoices'
import { dayRange, wallTimeOf } from '../../shared/utils/schedule'
import { dayInZone } from '../../shared/utils/homework'
import type { SampleRosterValue } from '../../shared/utils/samples'
import type { AuthUser } from '../utils/authz'
import type { RosterNextDue } from './roster-health'
import type { TrainingRosterValue } from './training'

type ClientRow = typeof clients.$inferSelect

async function todayBounds() {
  const zone = await businessTimeZone()
  const today = dayInZone(zone)
  return { zone, today, ...dayRange(today, zone) }
}

export async function trainerToday(user: AuthUser) {
  const db = useDb()
  const { zone, today, from, to } = await todayBounds()
  const mine = await db.select({ id: clients.id, householdName: clients.householdName }).from(clients).where(clientScope(user))
  const ids = mine.map(c => c.id)
  const names = new Map(mine.map(c => [c.id, c.householdName]))
  const [visits, queue, training, samples, due, alerts, unread] = await Promise.all([
    appointmentQuery(db).where(and(user.role === 'trainer' ? eq(appointments.trainerId, user.id) : undefined, gte(appointments.startsAt, from), lt(appointments.startsAt, to), eq(appointments.status, 'scheduled')))
      .orderBy(asc(appointments.startsAt)),
    listHomeworkReviewQueue(user, { state: 'awaiting', page: 1, pageSize: 10 }),
    ids.length ? trainingRosterStatus(ids, zone) : new Map<string, TrainingRosterValue>(),
    ids.length ? sampleRosterStatus(ids) : new Map<string, SampleRosterValue>(),
    ids.length ? rosterNextDue(ids, zone) : new Map<string, RosterNextDue>(),
    ids.length
      ? db.select({ clientId: diaryEntries.clientId, unreviewed: count(), oldest: sql<number>`min(${diaryEntries.occurredAt})` }).from(diaryEntries)
          .innerJoin(clients, eq(clients.id, diaryEntries.clientId))
          .where(and(clientScope(user), eq(diaryEntries.kind, 'alert'), isNull(diaryEntries.reviewedAt))).groupBy(diaryEntries.clientId)
      : [],
    unreadConversations(user),
  ])
  return {
    timeZone: zone,
    today,
    appointments: visits.map(v => ({ ...presentAppointment(v, user), logSessionUrl: v.kind === 'training' ? `/trainer/clients/${v.clientId}/training?appointment=${v.id}` : null })),
    review: {
      total: queue.total,
      rows: queue.rows.map(r => ({ id: r.id, title: r.assignmentTitle, householdName: r.householdName, dogName: r.dogName, sentAt: r.createdAt, url: `/trainer/homework/videos/${r.id}` })),
    },
    signOff: [...training.entries()].filter(([, t]) => t.readiness === 'ready' && t.current)
      .map(([clientId, t]) => ({ clientId, householdName: names.get(clientId), milestone: t.current, url: `/trainer/clients/${clientId}/training` })),
    samples: [...samples.entries()].filter(([, s]) => s.restockDue || s.overdueUses > 0)
      .map(([clientId, s]) => ({ clientId, householdName: names.get(clientId), restockDue: s.restockDue, overdueUses: s.overdueUses, targetUsesLeft: s.target.usesLeft, controlUsesLeft: s.control.usesLeft, url: `/trainer/clients/${clientId}/samples` })),
    health: [...due.entries()].filter(([, d]) => d.state === 'overdue' || d.state === 'due-soon')
      .map(([clientId, d]) => ({ clientId, householdName: names.get(clientId), ...d, url: `/trainer/clients/${clientId}` })),
    alerts: (alerts as Array<{ clientId: string, unreviewed: number, oldest: number }>).map(a => ({ clientId: a.clientId, householdName: names.get(a.clientId), unreviewed: a.unreviewed, oldest: new Date(Number(a.oldest)), url: `/trainer/clients/${a.clientId}/diary` })),
    messages: unread.map(u => ({ ...u, url: `/trainer/clients/${u.clientId}/messages` })),
  }
}

export async function officeToday(user: AuthUser) {
  const db = useDb()
  const { zone, today, from, to } = await todayBounds()
  const policy = await readWorkingDayPolicy(db)
  const quietSince = new Date(Date.now() - policy.quietClientDays * 86_400_000)
  // The trainer's last work with a household: an audited action, a training session, a message they wrote, or a
  // visit that has taken place (the demo's history has sessions and visits but few audit rows).
  const lastTrainerAction = sql<number | null>`(select max(at) from (
    select max(${auditLog.createdAt}) as at from ${auditLog} where ${auditLog.clientId} = ${clients.id} and ${auditLog.actorId} = ${clients.trainerId}
    union all select max(${trainingSessions.createdAt}) from ${trainingSessions} where ${trainingSessions.clientId} = ${clients.id}
    union all select max(${messages.createdAt}) from ${messages} where ${messages.clientId} = ${clients.id} and ${messages.authorId} = ${clients.trainerId}
    union all select max(${appointments.startsAt}) from ${appointments} where ${appointments.clientId} = ${clients.id} and ${appointments.status} = 'scheduled' and ${appointments.startsAt} <= ${Date.now()}
  ))`
  const [overdue, paidToday, pending, quiet, trainers, visits, unread] = await Promise.all([
    db.select({ id: invoices.id, number: invoices.number, clientId: invoices.clientId, householdName: clients.householdName, dueDate: invoices.dueDate, grossMinor: invoices.grossMinor, paidMinor: invoices.paidMinor, currency: invoices.currency, remindersSent: invoices.remindersSent, lastRemindedAt: invoices.lastRemindedAt })
      .from(invoices).innerJoin(clients, eq(clients.id, invoices.clientId))
      .where(and(eq(invoices.status, 'open'), lt(invoices.dueDate, today))).orderBy(asc(invoices.dueDate)).limit(50),
    db.select({ id: invoicePayments.id, invoiceId: invoicePayments.invoiceId, number: invoices.number, householdName: clients.householdName, amountMinor: invoicePayments.amountMinor, currency: invoices.currency, method: invoicePayments.method })
      .from(invoicePayments).innerJoin(invoices, eq(invoices.id, invoicePayments.invoiceId)).innerJoin(clients, eq(clients.id, invoices.clientId))
      .where(eq(invoicePayments.receivedOn, today)),
    db.select({ id: invitations.id, name: invitations.name, email: invitations.email, role: invitations.role, clientId: invitations.clientId, householdName: clients.householdName, expiresAt: invitations.expiresAt, createdAt: invitations.createdAt })
      .from(invitations).leftJoin(clients, eq(clients.id, invitations.clientId))
      .where(and(isNull(invitations.acceptedAt), isNull(invitations.revokedAt))).orderBy(asc(invitations.createdAt)).limit(50),
    db.select({ id: clients.id, householdName: clients.householdName, trainerName: users.name, lastAt: lastTrainerAction })
      .from(clients).innerJoin(users, eq(users.id, clients.trainerId))
      .where(and(notInArray(clients.status, ['closed']), sql`coalesce(${lastTrainerAction}, ${clients.createdAt}) < ${quietSince.getTime()}`))
      .orderBy(asc(sql`coalesce(${lastTrainerAction}, ${clients.createdAt})`)).limit(50),
    db.select({ id: users.id, name: users.name }).from(users).where(and(eq(users.role, 'trainer'), isNull(users.disabledAt))).orderBy(asc(users.name)),
    appointmentQuery(db).where(and(gte(appointments.startsAt, from), lt(appointments.startsAt, to), eq(appointments.status, 'scheduled'))).orderBy(asc(appointments.startsAt)),
    unreadConversations(user),
  ])
  const reminderPolicy = await readSetting(REMINDER_POLICY_KEY, reminderPolicySchema, REMINDER_POLICY_DEFAULTS, db)
  return {
    timeZone: zone,
    today,
    overdueInvoices: overdue.map(i => ({ ...i, daysOverdue: Math.round((Date.parse(today) - Date.parse(i.dueDate!)) / 86_400_000), url: `/admin/invoices/${i.id}` })),
    remindersDue: reminderPolicy.enabled ? overdue.filter(i => i.remindersSent < reminderPolicy.maxReminders).length : 0,
    paymentsToday: paidToday.map(p => ({ ...p, url: `/admin/invoices/${p.invoiceId}` })),
    invitations: pending.map(i => ({ ...i, expired: i.expiresAt.getTime() < Date.now() })),
    quietClients: quiet.map(q => ({ ...q, lastAt: q.lastAt ? new Date(Number(q.lastAt)) : null, url: `/admin/clients/${q.id}` })),
    quietDays: policy.quietClientDays,
    trainers: trainers.map(t => ({ ...t, appointments: visits.filter(v => v.trainerId === t.id).map(v => presentAppointment(v, user)) })),
    messages: unread.map(u => ({ ...u, url: `/admin/clients/${u.clientId}/messages` })),
  }
}

export async function householdToday(user: AuthUser) {
  const db = useDb()
  const zone = await businessTimeZone(db)
  const today = dayInZone(zone)
  const policy = await readWorkingDayPolicy(db)
  const households = await db.select().from(clients).where(clientScope(user)).orderBy(asc(clients.householdName))
  const unread = new Map((await unreadConversations(user)).map(u => [u.clientId, u.unread]))
  const upcoming = await upcomingAppointments(user, 20)
  const out = []
  for (const client of households) out.push(await householdCard(user, client, zone, today, policy.sampleRenewalDays, upcoming, unread.get(client.id) ?? 0))
  return { timeZone: zone, today, households: out }
}

async function householdCard(user: AuthUser, client: ClientRow, zone: string, today: string, renewalDays: number, upcoming: Awaited<ReturnType<typeof upcomingAppointments>>, unread: number) {
  const db = useDb()
  const [homework, openInvoices, bank, [trainer], [dog]] = await Promise.all([
    db.select({ id: homeworkAssignments.id, title: homeworkAssignments.title, dueDay: homeworkAssignments.dueDay }).from(homeworkAssignments)
      .where(and(eq(homeworkAssignments.clientId, client.id), eq(homeworkAssignments.state, 'open'))).orderBy(asc(homeworkAssignments.dueDay)).limit(5),
    db.select({ id: invoices.id, number: invoices.number, dueDate: invoices.dueDate, grossMinor: invoices.grossMinor, paidMinor: invoices.paidMinor, currency: invoices.currency })
      .from(invoices).where(and(eq(invoices.clientId, client.id), eq(invoices.status, 'open'))).orderBy(asc(invoices.dueDate)),
    getSampleBank(user, client),
    db.select({ name: users.name }).from(users).where(eq(users.id, client.trainerId)).limit(1),
    db.select({ name: dogs.name }).from(dogs).where(eq(dogs.clientId, client.id)).orderBy(asc(dogs.createdAt)).limit(1),
  ])
  const now = Date.now()
  const renewBy = now + renewalDays * 86_400_000
  return {
    client: { id: client.id, householdName: client.householdName, condition: client.condition, status: client.status, trainerName: trainer?.name ?? null, dogName: dog?.name ?? null },
    nextAppointment: upcoming.find(a => a.clientId === client.id) ?? null,
    appointments: upcoming.filter(a => a.clientId === client.id).slice(0, 5),
    homework: homework.map(h => ({ ...h, daysLeft: Math.round((Date.parse(h.dueDay) - Date.parse(today)) / 86_400_000), url: `/handler/homework/assignments/${h.id}` })),
    invoices: openInvoices.map(i => ({ ...i, url: `/handler/invoices/${i.id}` })),
    samples: {
      // The sample bank's own bag states (shared/utils/samples.ts bagState), so this card agrees with its pages.
      toFinish: bank.samples.filter(s => s.state === 'awaiting-answers').length,
      toFreeze: bank.samples.filter(s => s.state === 'to-store').length,
      out: bank.samples.flatMap(s => s.uses.filter(u => !u.backAt).map(u => ({
        id: s.id, bagCode: s.bagCode, kind: s.kind, outAt: u.outAt, minutesOut: Math.floor((now - new Date(u.outAt).getTime()) / 60_000), overdue: !!s.overdueUse,
      }))),
      toRenew: bank.samples.filter(s => s.state === 'ready' && s.renewAt && new Date(s.renewAt).getTime() <= renewBy).length,
      url: `/handler/samples/${client.id}`,
    },
    unreadMessages: unread,
    messagesUrl: `/handler/messages/${client.id}`,
    wallNow: wallTimeOf(new Date(), zone),
  }
}

/** Small counts for the navigation ("Review 3", "Messages 2"). */
export async function navigationCounts(user: AuthUser) {
  const db = useDb()
  const unread = (await unreadConversations(user)).reduce((s, u) => s + u.unread, 0)
  if (user.role === 'handler') return { messages: unread }
  const [review] = await db.select({ n: count() }).from(homeworkVideos).innerJoin(clients, eq(clients.id, homeworkVideos.clientId))
    .where(and(clientScope(user), isNull(homeworkVideos.reviewedAt)))
  return { messages: unread, review: review?.n ?? 0 }
}

