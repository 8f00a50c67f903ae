// iCalendar (RFC 5545) documents of appointments, made with ical-generator: the private feed of each person and the
// one-event attachment of reminder e-mails. A series is one VEVENT with its RRULE, EXDATEs for cancelled visits and
// an override (same UID, RECURRENCE-ID) for each moved or changed visit; times carry the business's TZID with its
// VTIMEZONE, so a weekly 10:00 stays 10:00 across a clock change.
import ical, { ICalCalendarMethod, ICalEventRepeatingFreq, ICalEventStatus } from 'ical-generator'
import { getVtimezoneComponent } from '@touch4it/ical-timezones'
import { APPOINTMENT_KIND_LABELS, endOf, type AppointmentKind } from '../../shared/utils/schedule'

export interface IcsAppointment {
  id: string
  seriesId: string | null
  rrule: string | null
  seriesSequence: number | null
  kind: AppointmentKind
  startsAt: Date
  originalStartsAt: Date
  durationMinutes: number
  timeZone: string
  place: string | null
  householdNotes: string | null
  privateNotes: string | null
  status: 'scheduled' | 'cancelled'
  sequence: number
  householdName: string
  dogName: string | null
  trainerName: string
  updatedAt: Date
}

const UID_DOMAIN = 'forescent.app'

function summaryOf(a: IcsAppointment, forHousehold: boolean) {
  const kind = APPOINTMENT_KIND_LABELS[a.kind]
  return forHousehold ? `${kind} with ${a.trainerName}${a.dogName ? ` (${a.dogName})` : ''}` : `${kind}: ${a.householdName}${a.dogName ? ` · ${a.dogName}` : ''}`
}

function descriptionOf(a: IcsAppointment, forHousehold: boolean) {
  const lines = [a.householdNotes ?? '']
  if (!forHousehold && a.privateNotes) lines.push(`Private notes: ${a.privateNotes}`)
  return lines.filter(Boolean).join('\n\n') || null
}

function parseRule(rrule: string): { interval: number, count: number } {
  const get = (k: string) => Number(new RegExp(`${k}=(\\d+)`).exec(rrule)?.[1] ?? 1)
  return { interval: get('INTERVAL'), count: get('COUNT') }
}

/** Differs from its series' pattern: emitted as an override with RECURRENCE-ID. */
function differsFrom(a: IcsAppointment, first: IcsAppointment) {
  return a.startsAt.getTime() !== a.originalStartsAt.getTime() || a.durationMinutes !== first.durationMinutes || a.kind !== first.kind
    || a.place !== first.place || a.householdNotes !== first.householdNotes || a.privateNotes !== first.privateNotes || a.sequence > 0
}

export function renderIcs(list: IcsAppointment[], opts: { name: string, timeZone: string, forHousehold: boolean, method?: 'publish' | 'request' | 'cancel' }): string {
  const cal = ical({
    name: opts.name,
    prodId: { company: 'Forescent', product: 'Forescent calendar', language: 'EN' },
    timezone: { name: opts.timeZone, generator: getVtimezoneComponent },
    method: opts.method === 'request' ? ICalCalendarMethod.REQUEST : opts.method === 'cancel' ? ICalCalendarMethod.CANCEL : ICalCalendarMethod.PUBLISH,
    ttl: 60 * 60,
  })
  const base = (a: IcsAppointment) => ({
    start: a.startsAt,
    end: endOf(a.startsAt, a.durationMinutes),
    timezone: opts.timeZone,
    summary: summaryOf(a, opts.forHousehold),
    description: descriptionOf(a, opts.forHousehold),
    location: a.place,
    stamp: a.updatedAt,
    lastModified: a.updatedAt,
  })
  const singles = list.filter(a => !a.seriesId || !a.rrule)
  for (const a of singles) {
    cal.createEvent({ ...base(a), id: `${a.id}@${UID_DOMAIN}`, sequence: a.sequence, status: a.status === 'cancelled' ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED })
  }
  const series = new Map<string, IcsAppointment[]>()
  for (const a of list.filter(x => x.seriesId && x.rrule)) {
    if (!series.has(a.seriesId!)) series.set(a.seriesId!, [])
    series.get(a.seriesId!)!.push(a)
  }
  for (const [seriesId, visits] of series) {
    visits.sort((x, y) => x.originalStartsAt.getTime() - y.originalStartsAt.getTime())
    const first = visits[0]!
    // The pattern's details come from a visit never changed on its own (every changed visit is an override).
    const template = visits.find(v => v.sequence === 0 && v.status === 'scheduled') ?? first
    const rule = parseRule(first.rrule!)
    const uid = `${seriesId}@${UID_DOMAIN}`
    const cancelled = visits.filter(v => v.status === 'cancelled')
    // The master event describes the pattern from the series' first visit (as first booked).
    cal.createEvent({
      ...base({ ...template, startsAt: first.originalStartsAt }),
      id: uid,
      sequence: first.seriesSequence ?? 0,
      status: ICalEventStatus.CONFIRMED,
      repeating: { freq: ICalEventRepeatingFreq.WEEKLY, interval: rule.interval, count: rule.count, ...(cancelled.length ? { exclude: cancelled.map(v => v.originalStartsAt) } : {}) },
    })
    for (const v of visits) {
      if (v.status === 'cancelled' || !differsFrom(v, template)) continue
      cal.createEvent({ ...base(v), id: uid, recurrenceId: v.originalStartsAt, sequence: (first.seriesSequence ?? 0) + v.sequence, status: ICalEventStatus.CONFIRMED })
    }
  }
  return cal.toString()
}
