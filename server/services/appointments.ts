// Appointments: booking (single or a weekly series), moving and cancelling one visit or the rest of a series, the
// calendar's lists, the overlap warning, and the household's notice e-mails with the visit as an .ics attachment.
import type { H3Event } from 'h3'
import { and, asc, eq, gte, inArray, lt, ne, sql } from 'drizzle-orm'
import { appointmentSeries, appointments, clients, dogs, reminderPreferences, users } from '../database/schema'
import type { AppointmentCancelInput, AppointmentCreateInput, AppointmentUpdateInput } from '../../shared/schemas/schedule'
import { businessProfile, businessProfileSchema } from '../../shared/schemas/settings-business'
import { WORKING_DAY_POLICY_DEFAULTS, WORKING_DAY_POLICY_KEY, workingDayPolicySchema, type WorkingDayPolicy } from '../../shared/schemas/settings-working-day'
import {
  APPOINTMENT_KIND_LABELS, clockMinutes, dayRange, endOf, instantOfWallTime, overlaps, planSeries, visitWhenText, wallTimeOf, type WallTime,
} from '../../shared/utils/schedule'
import { daysBetween } from '../../shared/utils/homework'
import { addDays } from '../../shared/utils/invoices'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'
import type { IcsAppointment } from './calendar-ics'

type AppointmentRow = typeof appointments.$inferSelect
type ClientRow = typeof clients.$inferSelect

export function readWorkingDayPolicy(db: DbOrTx = useDb()): Promise<WorkingDayPolicy> {
  return readSetting(WORKING_DAY_POLICY_KEY, workingDayPolicySchema, WORKING_DAY_POLICY_DEFAULTS, db)
}
export async function businessTimeZone(db: DbOrTx = useDb()): Promise<string> {
  return (await readSetting('business', businessProfileSchema, businessProfile.defaults, db)).timeZone
}

function ruleError(fieldErrors: Record<string, string>, status = 422): never {
  throw createError({ statusCode: status, statusMessage: status === 409 ? 'Conflict' : 'Unprocessable Content', message: Object.values(fieldErrors).join(' '), data: { fieldErrors } })
}

/** Loads an appointment of a client the user may see (404 otherwise); with `staff`, handlers are refused. */
export async function requireAppointmentAccess(event: H3Event, appointmentId: string, opts: { staff?: boolean } = {}) {
  const user = requireUser(event)
  const [row] = await useDb().select({ appointment: appointments, client: clients }).from(appointments)
    .innerJoin(clients, eq(clients.id, appointments.clientId))
    .where(and(eq(appointments.id, appointmentId), clientScope(user))).limit(1)
  if (!row) notFound('appointment')
  if (opts.staff && user.role === 'handler') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer and the office can change appointments. Write to your trainer to ask for a change.' })
  }
  return { user, appointment: row.appointment, client: row.client }
}

// ---------------------------------------------------------------------------------------------------------------
// Reading

const trainer = users
export const appointmentColumns = {
  id: appointments.id, seriesId: appointments.seriesId, clientId: appointments.clientId, trainerId: appointments.trainerId,
  dogId: appointments.dogId, kind: appointments.kind, startsAt: appointments.startsAt, originalStartsAt: appointments.originalStartsAt,
  durationMinutes: appointments.durationMinutes, timeZone: appointments.timeZone, place: appointments.place,
  householdNotes: appointments.householdNotes, privateNotes: appointments.privateNotes, status: appointments.status,
  cancelReason: appointments.cancelReason, sequence: appointments.sequence, updatedAt: appointments.updatedAt,
  householdName: clients.householdName, dogName: dogs.name, trainerName: trainer.name,
  rrule: appointmentSeries.rrule, seriesSequence: appointmentSeries.sequence,
}

export function appointmentQuery(db: DbOrTx = useDb()) {
  return db.select(appointmentColumns).from(appointments)
    .innerJoin(clients, eq(clients.id, appointments.clientId))
    .innerJoin(trainer, eq(trainer.id, appointments.trainerId))
    .leftJoin(dogs, eq(dogs.id, appointments.dogId))
    .leftJoin(appointmentSeries, eq(appointmentSeries.id, appointments.seriesId))
}
export type AppointmentView = Awaited<ReturnType<ReturnType<typeof appointmentQuery>['all']>>[number]

/** What a person is shown: households never see the trainer's private notes. */
export function presentAppointment(a: AppointmentView, user: AuthUser) {
  const { privateNotes, rrule, seriesSequence, ...rest } = a
  return {
    ...rest,
    kindLabel: APPOINTMENT_KIND_LABELS[a.kind],
    endsAt: endOf(a.startsAt, a.durationMinutes),
    repeats: !!rrule,
    ...(user.role === 'handler' ? {} : { privateNotes }),
  }
}

export async function listAppointments(user: AuthUser, q: { from: string, to: string, trainerId?: string, clientId?: string, includeCancelled?: boolean }) {
  const db = useDb()
  const zone = await businessTimeZone(db)
  const from = dayRange(q.from, zone).from
  const to = dayRange(q.to, zone).to
  const rows = await appointmentQuery(db).where(and(
    clientScope(user),
    gte(appointments.startsAt, from), lt(appointments.startsAt, to),
    q.trainerId && user.role !== 'handler' ? eq(appointments.trainerId, q.trainerId) : undefined,
    q.clientId ? eq(appointments.clientId, q.clientId) : undefined,
    q.includeCancelled ? undefined : eq(appointments.status, 'scheduled'),
  )).orderBy(asc(appointments.startsAt))
  return { timeZone: zone, rows: rows.map(r => presentAppointment(r, user)) }
}

/** The next scheduled visits of the user's households (or own diary), soonest first. */
export async function upcomingAppointments(user: AuthUser, limit = 10, now = new Date()) {
  const rows = await appointmentQuery().where(and(clientScope(user), gte(appointments.startsAt, new Date(now.getTime() - 60 * 60_000)), eq(appointments.status, 'scheduled')))
    .orderBy(asc(appointments.startsAt)).limit(limit)
  return rows.map(r => presentAppointment(r, user))
}

export async function getAppointment(user: AuthUser, appointmentId: string) {
  const [row] = await appointmentQuery().where(eq(appointments.id, appointmentId)).limit(1)
  return presentAppointment(row!, user)
}

// ---------------------------------------------------------------------------------------------------------------
// Booking

function durationOf(input: { time?: string, endTime?: string, durationMinutes?: number }, fallback?: number): number | undefined {
  if (input.durationMinutes !== undefined) return input.durationMinutes
  if (input.endTime !== undefined && input.time !== undefined) return clockMinutes(input.endTime) - clockMinutes(input.time)
  return fallback
}

async function checkDog(db: DbOrTx, clientId: string, dogId: string | null | undefined) {
  if (!dogId) return null
  const [dog] = await db.select({ id: dogs.id }).from(dogs).where(and(eq(dogs.id, dogId), eq(dogs.clientId, clientId))).limit(1)
  if (!dog) ruleError({ dogId: 'This dog is not on this client\'s file: choose one of the household\'s dogs.' })
  return dog.id
}

/** The visits a booking would create, without writing anything (the form's preview and the booking itself). */
export function plannedVisits(input: AppointmentCreateInput, timeZone: string): Array<WallTime & { startsAt: Date }> {
  if (input.repeat) {
    const { plan, problems } = planSeries({ date: input.date, time: input.time }, timeZone, {
      everyWeeks: input.repeat.everyWeeks, count: input.repeat.count ?? null, untilDate: input.repeat.untilDate ?? null,
    })
    if (!plan) ruleError(Object.fromEntries(Object.entries(problems).map(([k, v]) => [k === 'startTime' ? 'time' : `repeat.${k}`, v])))
    return plan.occurrences
  }
  const startsAt = instantOfWallTime(input.date, input.time, timeZone)
  if (!startsAt) ruleError({ time: `${input.time} does not exist on ${input.date} in ${timeZone} (the clocks go forward that night): choose another time.` })
  return [{ date: input.date, time: input.time, startsAt }]
}

/** Other visits of the same trainer that overlap any of these (the warning, never a refusal). */
export async function findOverlaps(db: DbOrTx, trainerId: string, visits: Array<{ startsAt: Date, durationMinutes: number }>, exceptIds: string[] = []) {
  if (!visits.length) return []
  const first = Math.min(...visits.map(v => v.startsAt.getTime()))
  const last = Math.max(...visits.map(v => endOf(v.startsAt, v.durationMinutes).getTime()))
  const rows = await appointmentQuery(db).where(and(
    eq(appointments.trainerId, trainerId), eq(appointments.status, 'scheduled'),
    gte(appointments.startsAt, new Date(first - 24 * 60 * 60_000)), lt(appointments.startsAt, new Date(last)),
    exceptIds.length ? sql`${appointments.id} not in ${exceptIds}` : undefined,
  ))
  return rows.filter(r => visits.some(v => overlaps(v.startsAt, v.durationMinutes, r.startsAt, r.durationMinutes)))
    .map(r => ({ id: r.id, startsAt: r.startsAt, endsAt: endOf(r.startsAt, r.durationMinutes), kindLabel: APPOINTMENT_KIND_LABELS[r.kind], householdName: r.householdName }))
}

export async function previewAppointment(client: ClientRow, input: AppointmentCreateInput) {
  const db = useDb()
  const zone = await businessTimeZone(db)
  await checkDog(db, client.id, input.dogId)
  const duration = durationOf(input)!
  const visits = plannedVisits(input, zone)
  const conflicts = await findOverlaps(db, client.trainerId, visits.map(v => ({ startsAt: v.startsAt, durationMinutes: duration })))
  return { timeZone: zone, durationMinutes: duration, visits: visits.map(v => ({ startsAt: v.startsAt, endsAt: endOf(v.startsAt, duration) })), conflicts }
}

export async function createAppointment(user: AuthUser, client: ClientRow, input: AppointmentCreateInput) {
  const db = useDb()
  const zone = await businessTimeZone(db)
  const dogId = await checkDog(db, client.id, input.dogId)
  const duration = durationOf(input)!
  const visits = plannedVisits(input, zone)
  const conflicts = await findOverlaps(db, client.trainerId, visits.map(v => ({ startsAt: v.startsAt, durationMinutes: duration })))
  const ids = await db.transaction(async (tx) => {
    let seriesId: string | null = null
    if (input.repeat) {
      const { plan } = planSeries({ date: input.date, time: input.time }, zone, { everyWeeks: input.repeat.everyWeeks, count: input.repeat.count ?? null, untilDate: input.repeat.untilDate ?? null })
      const [series] = await tx.insert(appointmentSeries).values({ clientId: client.id, rrule: plan!.rrule, timeZone: zone }).returning({ id: appointmentSeries.id })
      seriesId = series!.id
    }
    const rows = await tx.insert(appointments).values(visits.map(v => ({
      seriesId, clientId: client.id, trainerId: client.trainerId, dogId, kind: input.kind, startsAt: v.startsAt, originalStartsAt: v.startsAt,
      durationMinutes: duration, timeZone: zone, place: input.place, householdNotes: input.householdNotes, privateNotes: input.privateNotes, createdById: user.id,
    }))).returning({ id: appointments.id })
    await logAudit(tx, {
      actorId: user.id, action: 'appointment.booked', entityType: 'appointment', entityId: rows[0]!.id, clientId: client.id,
      data: { name: `${APPOINTMENT_KIND_LABELS[input.kind]} on ${input.date} at ${input.time}`, visits: rows.length, overlapping: conflicts.length },
    })
    await queueAppointmentNotice(tx, client, rows[0]!.id, 'booked', visits.length)
    return rows.map(r => r.id)
  })
  return { appointment: await getAppointment(user, ids[0]!), visits: ids.length, conflicts }
}

/** The wall time of a visit moved by the edit of another visit of its series (same shift in days, new clock time). */
function shiftedWall(visit: Date, zone: string, dayShift: number, newTime: string | undefined): WallTime {
  const wall = wallTimeOf(visit, zone)
  return { date: addDays(wall.date, dayShift), time: newTime ?? wall.time }
}

export async function updateAppointment(user: AuthUser, appointment: AppointmentRow, client: ClientRow, input: AppointmentUpdateInput) {
  if (appointment.status === 'cancelled') ruleError({ _: 'This visit is cancelled: book a new one instead.' }, 409)
  const db = useDb()
  const zone = appointment.timeZone
  const dogId = input.dogId !== undefined ? await checkDog(db, client.id, input.dogId) : undefined
  const before = wallTimeOf(appointment.startsAt, zone)
  const dayShift = input.date ? daysBetween(before.date, input.date) : 0
  const newTime = input.time
  const duration = durationOf({ time: input.time ?? before.time, endTime: input.endTime, durationMinutes: input.durationMinutes }, undefined)
  const targets = input.scope === 'following' && appointment.seriesId
    ? await db.select().from(appointments).where(and(eq(appointments.seriesId, appointment.seriesId), gte(appointments.originalStartsAt, appointment.originalStartsAt), eq(appointments.status, 'scheduled'))).orderBy(asc(appointments.originalStartsAt))
    : [appointment]
  const changes = targets.map((t) => {
    const wall = dayShift || newTime ? shiftedWall(t.startsAt, zone, dayShift, newTime) : null
    const startsAt = wall ? instantOfWallTime(wall.date, wall.time, zone) : t.startsAt
    if (!startsAt) ruleError({ time: `${wall!.time} does not exist on ${wall!.date} in ${zone} (the clocks go forward that night): choose another time.` })
    return { row: t, startsAt, durationMinutes: duration ?? t.durationMinutes }
  })
  const conflicts = await findOverlaps(db, appointment.trainerId, changes, changes.map(c => c.row.id))
  await db.transaction(async (tx) => {
    for (const c of changes) {
      await tx.update(appointments).set({
        startsAt: c.startsAt, durationMinutes: c.durationMinutes,
        ...(input.kind ? { kind: input.kind } : {}),
        ...(dogId !== undefined ? { dogId } : {}),
        ...(input.place !== undefined ? { place: input.place } : {}),
        ...(input.householdNotes !== undefined ? { householdNotes: input.householdNotes } : {}),
        ...(input.privateNotes !== undefined ? { privateNotes: input.privateNotes } : {}),
        sequence: sql`${appointments.sequence} + 1`,
      }).where(eq(appointments.id, c.row.id))
    }
    if (appointment.seriesId) await tx.update(appointmentSeries).set({ sequence: sql`${appointmentSeries.sequence} + 1` }).where(eq(appointmentSeries.id, appointment.seriesId))
    const after = wallTimeOf(changes[0]!.startsAt, zone)
    await logAudit(tx, {
      actorId: user.id, action: 'appointment.changed', entityType: 'appointment', entityId: appointment.id, clientId: client.id,
      data: { name: `${APPOINTMENT_KIND_LABELS[input.kind ?? appointment.kind]} on ${after.date} at ${after.time}`, from: `${before.date} ${before.time}`, visits: changes.length },
    })
    await queueAppointmentNotice(tx, client, appointment.id, 'changed', changes.length)
  })
  return { appointment: await getAppointment(user, appointment.id), visits: changes.length, conflicts }
}

export async function cancelAppointment(user: AuthUser, appointment: AppointmentRow, client: ClientRow, input: AppointmentCancelInput) {
  if (appointment.status === 'cancelled') ruleError({ _: 'This visit is already cancelled.' }, 409)
  const db = useDb()
  const ids = input.scope === 'following' && appointment.seriesId
    ? (await db.select({ id: appointments.id }).from(appointments).where(and(eq(appointments.seriesId, appointment.seriesId), gte(appointments.originalStartsAt, appointment.originalStartsAt), eq(appointments.status, 'scheduled')))).map(r => r.id)
    : [appointment.id]
  await db.transaction(async (tx) => {
    await tx.update(appointments).set({ status: 'cancelled', cancelReason: input.reason, sequence: sql`${appointments.sequence} + 1` }).where(inArray(appointments.id, ids))
    if (appointment.seriesId) await tx.update(appointmentSeries).set({ sequence: sql`${appointmentSeries.sequence} + 1` }).where(eq(appointmentSeries.id, appointment.seriesId))
    const wall = wallTimeOf(appointment.startsAt, appointment.timeZone)
    await logAudit(tx, {
      actorId: user.id, action: 'appointment.cancelled', entityType: 'appointment', entityId: appointment.id, clientId: client.id,
      data: { name: `${APPOINTMENT_KIND_LABELS[appointment.kind]} on ${wall.date} at ${wall.time}`, visits: ids.length, reason: input.reason },
    })
    await queueAppointmentNotice(tx, client, appointment.id, 'cancelled', ids.length, input.reason)
  })
  return { appointment: await getAppointment(user, appointment.id), visits: ids.length }
}

/** Moves a reassigned client's visits still to come to the new trainer's diary. */
export async function moveFutureAppointments(tx: Tx, clientId: string, trainerId: string, now = new Date()) {
  await tx.update(appointments).set({ trainerId }).where(and(eq(appointments.clientId, clientId), gte(appointments.startsAt, now), ne(appointments.trainerId, trainerId)))
}

// ---------------------------------------------------------------------------------------------------------------
// E-mails


/** The household's notice of a booking, a change or a cancellation, with the visit attached as an .ics file. */
async function queueAppointmentNotice(tx: Tx, client: ClientRow, appointmentId: string, what: 'booked' | 'changed' | 'cancelled', visits: number, reason?: string | null) {
  const policy = await readWorkingDayPolicy(tx)
  if (!policy.appointmentReminders) return
  const [a] = await appointmentQuery(tx).where(eq(appointments.id, appointmentId)).limit(1)
  if (!a) return
  const recipients = await reminderRecipients(tx, client.id, 'appointment')
  const series = visits > 1 ? ` (and ${visits - 1} more ${visits - 1 === 1 ? 'visit' : 'visits'} of the series)` : ''
  const verb = { booked: 'is booked', changed: 'has changed', cancelled: 'is cancelled' }[what]
  for (const r of recipients) {
    await queueEmail(tx, {
      to: r.email,
      ...composeEmail({
        subject: `${APPOINTMENT_KIND_LABELS[a.kind]} ${verb}: ${visitWhenText(a.startsAt, a.timeZone)}`,
        greeting: `Hello ${r.name},`,
        paragraphs: [
          `${APPOINTMENT_KIND_LABELS[a.kind]} with ${a.trainerName}${a.dogName ? ` for ${a.dogName}` : ''} ${verb}: ${visitWhenText(a.startsAt, a.timeZone)}${a.place && what !== 'cancelled' ? `, ${a.place}` : ''}${series}.`,
          ...(reason ? [`Reason: ${reason}`] : []),
          ...(a.householdNotes && what !== 'cancelled' ? [`Notes from your trainer: ${a.householdNotes}`] : []),
          what === 'cancelled' ? 'The attached calendar file removes it from your phone\'s calendar.' : 'Open the attached calendar file to add it to your phone\'s calendar.',
        ],
        action: { label: 'See your appointments', url: appUrl('/handler/calendar') },
      }),
      attachments: [{ kind: 'appointment-ics', id: appointmentId }],
    })
  }
}

/** The household's handlers who want this kind of e-mail (their own choice; the office's switch is checked by callers). */
export async function reminderRecipients(db: DbOrTx, clientId: string, kind: import('../../shared/utils/reminders').ReminderKind) {
  const handlers = await householdHandlers(db, clientId, { activeOnly: true })
  if (!handlers.length) return []
  const off = await db.select({ userId: reminderPreferences.userId }).from(reminderPreferences)
    .where(and(inArray(reminderPreferences.userId, handlers.map(h => h.id)), eq(reminderPreferences.kind, kind), eq(reminderPreferences.enabled, false)))
  const offIds = new Set(off.map(o => o.userId))
  return handlers.filter(h => !offIds.has(h.id))
}

/** The attachment of a notice or reminder: the one visit as a calendar file (METHOD:CANCEL when cancelled). */
export async function appointmentIcsAttachment(appointmentId: string) {
  const [a] = await appointmentQuery().where(eq(appointments.id, appointmentId)).limit(1)
  if (!a) throw new Error(`Appointment ${appointmentId} no longer exists`)
  const single: IcsAppointment = { ...a, seriesId: null, rrule: null, seriesSequence: null, sequence: a.sequence + (a.seriesSequence ?? 0) }
  const content = renderIcs([single], { name: 'Forescent', timeZone: a.timeZone, forHousehold: true, method: a.status === 'cancelled' ? 'cancel' : 'request' })
  return { filename: 'appointment.ics', content, contentType: `text/calendar; charset=utf-8; method=${a.status === 'cancelled' ? 'CANCEL' : 'REQUEST'}` }
}
