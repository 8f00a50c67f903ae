// The demo's working fortnight (used by seed-data.ts): appointments a week back and two ahead, one weekly series with
// a cancelled visit, and a few conversations. Everything is invented; times are wall times in the business's zone
// (Europe/London), relative to the seed's day.
import type { Database } from '../../server/database/client'
import * as s from '../../server/database/schema'
import { addDays } from '../../shared/utils/invoices'
import { instantOfWallTime, planSeries } from '../../shared/utils/schedule'
import type { AppointmentKind } from '../../shared/utils/schedule'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

export const SCHEDULE_TABLES_CHILD_FIRST = ['message_notices', 'message_reads', 'messages', 'reminder_preferences', 'calendar_feeds', 'appointments', 'appointment_series'] as const
const ZONE = 'Europe/London'

interface Visit { key: string, client: string, trainer: string, kind: AppointmentKind, day: number, time: string, minutes: number, place: string, notes?: string, privateNotes?: string }

const VISITS: Visit[] = [
  { key: 'lind-home', client: 'lindgren', trainer: 'trainer', kind: 'home-visit', day: 1, time: '16:30', minutes: 90, place: 'Lindgren home, Fenwick Cross', notes: 'Please have two fresh control samples thawed in their bags, and Sami home from school.', privateNotes: 'Check the night-time log with the parent; Pepper was restless last week.' },
  { key: 'moreau-assess', client: 'moreau', trainer: 'trainer', kind: 'assessment', day: 0, time: '15:00', minutes: 60, place: 'Larkspur training barn', notes: 'Discrimination check with new line-up.' },
  { key: 'moreau-public', client: 'moreau', trainer: 'trainer', kind: 'public-access', day: 3, time: '11:00', minutes: 120, place: 'Ashcombe market square', notes: 'Bring the working vest and a water bowl. We meet by the clock tower.' },
  { key: 'naka-checkin-past', client: 'nakashima', trainer: 'trainer', kind: 'check-in', day: -3, time: '14:00', minutes: 45, place: 'Video call', notes: 'Aftercare check-in.' },
  { key: 'naka-checkin', client: 'nakashima', trainer: 'trainer', kind: 'check-in', day: 10, time: '14:00', minutes: 45, place: 'Nakashima home, Holloway Green', notes: 'Aftercare visit: we will look at the last month of the diary together.' },
  { key: 'acht-training', client: 'achterberg', trainer: 'trainer2', kind: 'training', day: 0, time: '09:30', minutes: 60, place: 'Millbrook village hall', notes: 'Imprinting session 3.' },
  { key: 'acht-training-2', client: 'achterberg', trainer: 'trainer2', kind: 'training', day: 2, time: '09:30', minutes: 60, place: 'Millbrook village hall' },
  { key: 'bren-assess', client: 'brennan', trainer: 'trainer2', kind: 'assessment', day: 1, time: '11:00', minutes: 90, place: 'Brennan home, Kestle Bay', notes: 'Suitability assessment of Fennel: a quiet room and a few of his toys, please.' },
  { key: 'cast-home', client: 'castellano', trainer: 'trainer2', kind: 'home-visit', day: -2, time: '17:00', minutes: 60, place: 'Castellano home, Millbrook' },
  { key: 'ferris-home', client: 'ferris', trainer: 'trainer3', kind: 'home-visit', day: 4, time: '08:30', minutes: 60, place: 'Ferris home, Kestle Bay' },
]

export async function seedSchedule(tx: Tx, o: { today: Date, seedId: (name: string) => string }) {
  const today = o.today.toISOString().slice(0, 10)
  const rows: (typeof s.appointments.$inferInsert)[] = []
  for (const v of VISITS) {
    const date = addDays(today, v.day)
    const startsAt = instantOfWallTime(date, v.time, ZONE)!
    rows.push({
      id: o.seedId(`appointment:${v.key}`), clientId: o.seedId(`client:${v.client}`), trainerId: o.seedId(`user:${v.trainer}`), dogId: o.seedId(`dog:${v.client}`),
      kind: v.kind, startsAt, originalStartsAt: startsAt, durationMinutes: v.minutes, timeZone: ZONE, place: v.place,
      householdNotes: v.notes ?? null, privateNotes: v.privateNotes ?? null, createdById: o.seedId(`user:${v.trainer}`),
    })
  }
  // A weekly training series with the Fairweather household: a week ago, today, and four more; next week's visit is
  // cancelled (the trainer is at a course).
  const seriesId = o.seedId('series:fairweather-weekly')
  const { plan } = planSeries({ date: addDays(today, -7), time: '10:00' }, ZONE, { everyWeeks: 1, count: 6 })
  await tx.insert(s.appointmentSeries).values({ id: seriesId, clientId: o.seedId('client:fairweather'), rrule: plan!.rrule, timeZone: ZONE, sequence: 1 })
  plan!.occurrences.forEach((occ, i) => {
    rows.push({
      id: o.seedId(`appointment:fairweather-weekly:${i}`), seriesId, clientId: o.seedId('client:fairweather'), trainerId: o.seedId('user:trainer'), dogId: o.seedId('dog:fairweather'),
      kind: 'training', startsAt: occ.startsAt, originalStartsAt: occ.startsAt, durationMinutes: 75, timeZone: ZONE, place: 'Ashcombe recreation ground',
      householdNotes: 'Weekly discrimination session: bring two target and two control samples in the cool bag.',
      privateNotes: 'Move to blind trials once the hit rate holds.',
      ...(i === 2 ? { status: 'cancelled' as const, cancelReason: 'Trainer at a course that day.', sequence: 1 } : {}),
      createdById: o.seedId('user:trainer'),
    })
  })
  await tx.insert(s.appointments).values(rows)

  const at = (daysAgo: number, hh: number, mm = 0) => new Date(o.today.getTime() - daysAgo * 86_400_000 + (hh * 60 + mm) * 60_000)
  const msg = (key: string, client: string, author: string, when: Date, body: string) => ({ id: o.seedId(`message:${key}`), clientId: o.seedId(`client:${client}`), authorId: o.seedId(`user:${author}`), body, createdAt: when })
  await tx.insert(s.messages).values([
    msg('fw-1', 'fairweather', 'handler', at(2, 19, 12), 'Juniper alerted twice this evening, 40 minutes apart, and the migraine started about an hour after the second one. Should I log both alerts?'),
    msg('fw-2', 'fairweather', 'trainer', at(1, 8, 45), 'Yes, log both with their times: the diary matches each alert to the episode that follows. Well done for noticing.'),
    msg('fw-3', 'fairweather', 'handler', at(0, 7, 30), 'Thank you! Could we move Tuesday\'s session to the afternoon? Mornings are hard for me this week.'),
    msg('ach-1', 'achterberg', 'trainer2', at(1, 17, 5), 'Lovely first week with Thistle. For Thursday, please collect two control samples at least 45 minutes after food.'),
  ])
  await tx.insert(s.messageReads).values([
    { clientId: o.seedId('client:fairweather'), userId: o.seedId('user:handler'), readAt: at(1, 9) },
    { clientId: o.seedId('client:fairweather'), userId: o.seedId('user:trainer'), readAt: at(1, 8, 45) },
    { clientId: o.seedId('client:achterberg'), userId: o.seedId('user:trainer2'), readAt: at(1, 17, 5) },
  ])
}
