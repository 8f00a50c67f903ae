// The working day's pure rules: appointment kinds, wall times in the business's time zone, repeating series
// (RFC 5545 recurrence rules expanded with the rrule library), overlaps and day/week ranges. No I/O.
import { TZDate } from '@date-fns/tz'
import * as rrulePackage from 'rrule'
import { daysBetween } from './homework'
import { addDays } from './invoices'

// rrule ships CommonJS for Node and ES modules for bundlers: take RRule from whichever shape this import has.
const RRule = ((rrulePackage as unknown as { RRule?: typeof rrulePackage.RRule }).RRule
  ?? (rrulePackage as unknown as { default: typeof rrulePackage }).default.RRule)

export const APPOINTMENT_KINDS = ['home-visit', 'training', 'assessment', 'public-access', 'check-in', 'other'] as const
export type AppointmentKind = (typeof APPOINTMENT_KINDS)[number]
export const APPOINTMENT_KIND_LABELS: Record<AppointmentKind, string> = {
  'home-visit': 'Home visit',
  'training': 'Training session',
  'assessment': 'Assessment',
  'public-access': 'Public-access outing',
  'check-in': 'Check-in',
  'other': 'Other',
}
export const APPOINTMENT_STATUSES = ['scheduled', 'cancelled'] as const
export type AppointmentStatus = (typeof APPOINTMENT_STATUSES)[number]

/** Our own limits: a visit is 5 minutes to 12 hours; a series ends within two years of its first day. */
export const MIN_DURATION_MINUTES = 5
export const MAX_DURATION_MINUTES = 12 * 60
export const MAX_SERIES_DAYS = 731
export const MAX_SERIES_EVERY_WEEKS = 8

const MINUTE = 60_000

export interface WallTime { date: string, time: string }

function parts(date: string, time = '00:00') {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  const [hh, mm] = time.split(':').map(Number) as [number, number]
  return { y, m, d, hh, mm }
}
const pad = (n: number) => String(n).padStart(2, '0')

/** The wall-clock date and time of an instant in a time zone. */
export function wallTimeOf(instant: Date | number, timeZone: string): WallTime {
  const t = new TZDate(typeof instant === 'number' ? instant : instant.getTime(), timeZone)
  return { date: `${t.getFullYear()}-${pad(t.getMonth() + 1)}-${pad(t.getDate())}`, time: `${pad(t.getHours())}:${pad(t.getMinutes())}` }
}

/**
 * The instant at which the clocks of `timeZone` show `date` `time`, or null when that wall time does not exist there
 * (the hour skipped when clocks go forward). In the repeated hour when clocks go back, the later of the two is taken
 * (what @date-fns/tz gives; documented in docs/calendar.md).
 */
export function instantOfWallTime(date: string, time: string, timeZone: string): Date | null {
  const { y, m, d, hh, mm } = parts(date, time)
  const t = new TZDate(y, m - 1, d, hh, mm, timeZone)
  const back = wallTimeOf(t.getTime(), timeZone)
  if (back.date !== date || back.time !== time) return null
  return new Date(t.getTime())
}

/** [start, end) of a calendar day in a time zone (23 or 25 hours long on the days the clocks change). */
export function dayRange(date: string, timeZone: string): { from: Date, to: Date } {
  const startOf = (day: string) => {
    const { y, m, d } = parts(day)
    return new Date(new TZDate(y, m - 1, d, 0, 0, timeZone).getTime())
  }
  return { from: startOf(date), to: startOf(addDays(date, 1)) }
}

/** The Monday of the week holding `date` (ISO 8601 weeks start on Monday). */
export function mondayOf(date: string): string {
  const { y, m, d } = parts(date)
  const weekday = (new Date(Date.UTC(y, m - 1, d)).getUTCDay() + 6) % 7
  return addDays(date, -weekday)
}

export interface RepeatInput {
  /** Every N weeks (1 = weekly). */
  everyWeeks: number
  /** End after this many occurrences, or on this day (inclusive); one of the two is required. */
  count?: number | null
  untilDate?: string | null
}

export interface SeriesPlan {
  /** RFC 5545 RRULE value, always with COUNT (an UNTIL day is turned into the count it gives). */
  rrule: string
  occurrences: Array<WallTime & { startsAt: Date }>
}

export type Problems = Record<string, string>

/**
 * Expands a series that starts on `date` at `time` in `timeZone`. Each occurrence keeps the wall time (10:00 stays
 * 10:00 across a clock change), which is what a household expects of "every Tuesday at 10". Refuses (as problems
 * keyed by field) a series without an end, longer than two years, or with an occurrence in a skipped hour.
 */
export function planSeries(start: WallTime, timeZone: string, repeat: RepeatInput): { plan: SeriesPlan | null, problems: Problems } {
  const problems: Problems = {}
  if (!Number.isInteger(repeat.everyWeeks) || repeat.everyWeeks < 1 || repeat.everyWeeks > MAX_SERIES_EVERY_WEEKS) {
    problems.everyWeeks = `Repeat every 1 to ${MAX_SERIES_EVERY_WEEKS} weeks.`
  }
  const hasCount = repeat.count !== null && repeat.count !== undefined
  const hasUntil = !!repeat.untilDate
  if (!hasCount && !hasUntil) problems.count = 'Say when the series ends: after a number of visits, or on a day.'
  if (hasCount && hasUntil) problems.count = 'Choose one end: a number of visits or a last day, not both.'
  if (hasCount && (!Number.isInteger(repeat.count) || repeat.count! < 2)) problems.count = 'A series has at least 2 visits.'
  if (hasUntil && repeat.untilDate! <= start.date) problems.untilDate = 'The last day must be after the first visit.'
  if (hasUntil && daysBetween(start.date, repeat.untilDate!) > MAX_SERIES_DAYS) problems.untilDate = 'A series can run for at most two years: choose an earlier last day.'
  if (hasCount && Number.isInteger(repeat.count) && (repeat.count! - 1) * repeat.everyWeeks * 7 > MAX_SERIES_DAYS) {
    problems.count = `A series can run for at most two years: at most ${Math.floor(MAX_SERIES_DAYS / (repeat.everyWeeks * 7)) + 1} visits every ${repeat.everyWeeks === 1 ? 'week' : `${repeat.everyWeeks} weeks`}.`
  }
  if (Object.keys(problems).length) return { plan: null, problems }
  const { y, m, d, hh, mm } = parts(start.date, start.time)
  // rrule works in "floating" time: UTC fields stand for the wall clock, turned into instants below.
  const dtstart = new Date(Date.UTC(y, m - 1, d, hh, mm))
  const options = {
    freq: RRule.WEEKLY,
    interval: repeat.everyWeeks,
    dtstart,
    ...(hasCount ? { count: repeat.count! } : { until: new Date(Date.parse(`${repeat.untilDate}T23:59:59Z`)) }),
  }
  const walls = new RRule(options).all()
  if (walls.length < 2) return { plan: null, problems: { untilDate: 'This last day leaves only one visit: choose a later day or book a single visit.' } }
  const occurrences: SeriesPlan['occurrences'] = []
  for (const w of walls) {
    const wall = { date: w.toISOString().slice(0, 10), time: w.toISOString().slice(11, 16) }
    const startsAt = instantOfWallTime(wall.date, wall.time, timeZone)
    if (!startsAt) return { plan: null, problems: { startTime: `${wall.time} does not exist on ${wall.date} in ${timeZone} (the clocks go forward): choose another time.` } }
    occurrences.push({ ...wall, startsAt })
  }
  const rrule = new RRule({ freq: RRule.WEEKLY, interval: repeat.everyWeeks, count: occurrences.length }).toString().replace(/^RRULE:/, '')
  return { plan: { rrule, occurrences }, problems: {} }
}

/** "09:30" → 570, minutes since midnight of a wall-clock time. */
export function clockMinutes(time: string): number {
  return Number(time.slice(0, 2)) * 60 + Number(time.slice(3, 5))
}

/** "Thursday 3 December, 10:00 GMT": a visit's start in e-mails (the zone always named). */
export function visitWhenText(startsAt: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { weekday: 'long', day: 'numeric', month: 'long', hour: '2-digit', minute: '2-digit', timeZone, timeZoneName: 'short' }).format(startsAt)
}

/** True when [aStart, aStart+aMinutes) and [bStart, bStart+bMinutes) share a minute. */
export function overlaps(aStart: Date, aMinutes: number, bStart: Date, bMinutes: number): boolean {
  return aStart.getTime() < bStart.getTime() + bMinutes * MINUTE && bStart.getTime() < aStart.getTime() + aMinutes * MINUTE
}

export function endOf(startsAt: Date, durationMinutes: number): Date {
  return new Date(startsAt.getTime() + durationMinutes * MINUTE)
}

/** "Europe/London" → the offset name shown beside a time when a viewer's zone differs from the business's. */
export function zoneDiffers(viewerZone: string | null | undefined, businessZone: string, at: Date): boolean {
  if (!viewerZone || viewerZone === businessZone) return false
  const a = wallTimeOf(at, viewerZone)
  const b = wallTimeOf(at, businessZone)
  return a.date !== b.date || a.time !== b.time
}

/** Whether a training appointment is today (in the business's zone) and so can open the session form pre-filled. */
export function isOnDay(startsAt: Date, day: string, timeZone: string): boolean {
  return wallTimeOf(startsAt, timeZone).date === day
}

/**
 * "Wed 2 Dec, 10:00–11:15" in the viewer's zone, with the zone's short name added when it differs from the
 * business's (so a trainer abroad sees "10:00–11:15 GMT+1" and knows it is their own clock).
 */
export function visitTimeText(startsAt: Date | string, endsAt: Date | string, viewerZone: string, businessZone: string, opts: { withDay?: boolean } = {}): string {
  const start = new Date(startsAt)
  const end = new Date(endsAt)
  const day = new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', timeZone: viewerZone }).format(start)
  const time = (d: Date) => new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone: viewerZone }).format(d)
  const zone = zoneDiffers(viewerZone, businessZone, start)
    ? ` ${new Intl.DateTimeFormat('en-GB', { timeZone: viewerZone, timeZoneName: 'short' }).formatToParts(start).find(p => p.type === 'timeZoneName')?.value ?? viewerZone}`
    : ''
  return `${opts.withDay === false ? '' : `${day}, `}${time(start)}–${time(end)}${zone}`
}

/** "Today", "Tomorrow", or "Wed 9 Dec" for a calendar date relative to today. */
export function dayHeading(date: string, today: string): string {
  const diff = daysBetween(today, date)
  if (diff === 0) return 'Today'
  if (diff === 1) return 'Tomorrow'
  if (diff === -1) return 'Yesterday'
  const { y, m, d } = parts(date)
  return new Intl.DateTimeFormat('en-GB', { weekday: 'long', day: 'numeric', month: 'long', timeZone: 'UTC' }).format(new Date(Date.UTC(y, m - 1, d)))
}
