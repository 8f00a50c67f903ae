// Dog profiles: age, health-record due dates, the suitability assessment and the rules for status changes.
//
// Pure logic only: no database, no HTTP, no Nuxt. Calendar dates are 'YYYY-MM-DD' strings, compared and counted
// as calendar days (never as instants), so the answers do not depend on the server's time zone.
import { countOf, formatDay } from './format'
import type { DOG_SEXES, DOG_SOURCES, DOG_STATUSES } from './enums'

export type DogStatus = (typeof DOG_STATUSES)[number]
export type DogSource = (typeof DOG_SOURCES)[number]
export type DogSex = (typeof DOG_SEXES)[number]

export const DOG_STATUS_LABELS: Record<DogStatus, string> = {
  'assessment': 'Assessment',
  'in-training': 'In training',
  'placed': 'Placed',
  'retired': 'Retired',
  'withdrawn': 'Withdrawn',
}
/** The same states in plain words, for the household's handlers. */
export const DOG_STATUS_PLAIN: Record<DogStatus, string> = {
  'assessment': 'Being assessed to see whether the programme suits them',
  'in-training': 'In training on the programme',
  'placed': 'Placed with the household as a working alert dog',
  'retired': 'Retired from alert work',
  'withdrawn': 'No longer on the programme',
}
export const DOG_SOURCE_LABELS: Record<DogSource, string> = {
  'own-dog': "Client's own dog",
  'programme-bred': 'Programme-bred',
  'rescue': 'Rescue',
}
export const DOG_SEX_LABELS: Record<DogSex, string> = { female: 'Female', male: 'Male' }

// ---------------------------------------------------------------------------------------------------------------
// Calendar days

const DAY_RE = /^(\d{4})-(\d{2})-(\d{2})$/

function parts(day: string): [number, number, number] | null {
  const m = DAY_RE.exec(day)
  if (!m) return null
  const y = Number(m[1]), mo = Number(m[2]), d = Number(m[3])
  if (mo < 1 || mo > 12 || d < 1 || d > daysInMonth(y, mo)) return null
  return [y, mo, d]
}

function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate()
}

/** True for a real calendar day written 'YYYY-MM-DD' (so '2025-02-30' is false). */
export function isCalendarDay(day: string): boolean {
  return parts(day) !== null
}

/** Whole calendar days from `from` to `to` (negative when `to` is earlier). */
export function calendarDaysBetween(from: string, to: string): number {
  const a = parts(from), b = parts(to)
  if (!a || !b) throw new RangeError(`Not a calendar day: ${!a ? from : to}`)
  return Math.round((Date.UTC(b[0], b[1] - 1, b[2]) - Date.UTC(a[0], a[1] - 1, a[2])) / 86_400_000)
}

/** Today's calendar day in a time zone (the viewer's), as 'YYYY-MM-DD'. An unknown zone falls back to UTC. */
export function todayInTimeZone(timeZone: string, now: Date = new Date()): string {
  let fmt: Intl.DateTimeFormat
  try {
    fmt = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' })
  }
  catch {
    fmt = new Intl.DateTimeFormat('en-CA', { timeZone: 'UTC', year: 'numeric', month: '2-digit', day: '2-digit' })
  }
  const p = Object.fromEntries(fmt.formatToParts(now).map(x => [x.type, x.value]))
  return `${p.year}-${p.month}-${p.day}`
}


/**
 * A dog's age for display: "5 days", "3 weeks", "8 months", "1 year", "2 years 3 months".
 * Months are whole calendar months (born on the 31st, a month is complete on the last day of a shorter month).
 * Null when the date of birth is missing, not a real day, or after today.
 */
export function dogAge(dateOfBirth: string | null | undefined, today: string): string | null {
  if (!dateOfBirth) return null
  const b = parts(dateOfBirth), t = parts(today)
  if (!b || !t) return null
  const days = calendarDaysBetween(dateOfBirth, today)
  if (days < 0) return null
  let months = (t[0] - b[0]) * 12 + (t[1] - b[1])
  const monthEnd = t[2] === daysInMonth(t[0], t[1])
  if (t[2] < b[2] && !monthEnd) months -= 1
  if (months < 1) return days < 14 ? countOf(days, 'day') : countOf(Math.floor(days / 7), 'week')
  const years = Math.floor(months / 12)
  const rest = months % 12
  if (years === 0) return countOf(rest, 'month')
  return rest === 0 ? countOf(years, 'year') : `${countOf(years, 'year')} ${countOf(rest, 'month')}`
}

// ---------------------------------------------------------------------------------------------------------------
// Health records and due dates

export const HEALTH_RECORD_KINDS = ['vaccination', 'health-clearance', 'parasite-treatment', 'other'] as const
export type HealthRecordKind = (typeof HEALTH_RECORD_KINDS)[number]
export const HEALTH_RECORD_KIND_LABELS: Record<HealthRecordKind, string> = {
  'vaccination': 'Vaccination',
  'health-clearance': 'Health clearance',
  'parasite-treatment': 'Parasite treatment',
  'other': 'Other',
}

export const DUE_STATES = ['overdue', 'due-soon', 'ok', 'none'] as const
export type DueState = (typeof DUE_STATES)[number]
export const DUE_STATE_LABELS: Record<DueState, string> = {
  'overdue': 'Overdue',
  'due-soon': 'Due soon',
  'ok': 'Up to date',
  'none': 'No renewal date',
}

/**
 * How many days ahead a renewal counts as "due soon". Our own choice, not a published rule: four weeks leaves time
 * to book a vet appointment (and for a booster course to be arranged) before the date passes.
 */
export const DUE_SOON_DAYS = 30

/**
 * The state of a renewal date on a day: 'overdue' once the day has passed, 'due-soon' from `soonDays` before it up to
 * and including the day itself, 'ok' before that, 'none' without a date.
 */
export function dueState(dueOn: string | null | undefined, today: string, soonDays = DUE_SOON_DAYS): DueState {
  if (!dueOn) return 'none'
  const left = calendarDaysBetween(today, dueOn)
  if (left < 0) return 'overdue'
  return left <= soonDays ? 'due-soon' : 'ok'
}

const SEVERITY: Record<DueState, number> = { 'overdue': 3, 'due-soon': 2, 'ok': 1, 'none': 0 }
export function worstDueState(states: Iterable<DueState>): DueState {
  let worst: DueState = 'none'
  for (const s of states) if (SEVERITY[s] > SEVERITY[worst]) worst = s
  return worst
}

export interface HealthRecordLike {
  id: string
  dogId: string
  kind: HealthRecordKind
  name: string
  doneOn: string
  dueOn: string | null
}

export interface HealthRecordState {
  id: string
  /** The due state of this record's renewal date; 'none' once a later record of the same kind and name renews it. */
  state: DueState
  /** A later record of the same kind and name exists (the course was repeated): this one no longer raises a flag. */
  superseded: boolean
  /** Days from today until the renewal date (negative: overdue), or null. */
  daysLeft: number | null
}

const recordKey = (r: Pick<HealthRecordLike, 'dogId' | 'kind' | 'name'>) => `${r.dogId}\u0000${r.kind}\u0000${r.name.trim().toLowerCase()}`

/**
 * The state of every record. Only the most recent record of each dog, kind and name (by the day it was done; on the same
 * day the later one in input order) counts: a rabies vaccination given again renews the earlier one.
 */
export function healthRecordStates<R extends HealthRecordLike>(records: readonly R[], today: string, soonDays = DUE_SOON_DAYS): Map<string, HealthRecordState> {
  const latest = new Map<string, R>()
  for (const r of records) {
    const k = recordKey(r)
    const cur = latest.get(k)
    if (!cur || r.doneOn >= cur.doneOn) latest.set(k, r)
  }
  const out = new Map<string, HealthRecordState>()
  for (const r of records) {
    const superseded = latest.get(recordKey(r)) !== r
    out.set(r.id, {
      id: r.id,
      state: superseded ? 'none' : dueState(r.dueOn, today, soonDays),
      superseded,
      daysLeft: r.dueOn ? calendarDaysBetween(today, r.dueOn) : null,
    })
  }
  return out
}

export interface DogHealthSummary {
  /** The worst state among the dog's current records (for a flag). */
  state: DueState
  overdue: number
  dueSoon: number
  /** The earliest renewal date among current records that is overdue or due soon. */
  next: { name: string, dueOn: string } | null
}

/** Per dog id: the worst due state of its current records and how many are overdue or due soon. */
export function healthSummary(records: readonly HealthRecordLike[], today: string, soonDays = DUE_SOON_DAYS): Record<string, DogHealthSummary> {
  const states = healthRecordStates(records, today, soonDays)
  const out: Record<string, DogHealthSummary> = {}
  for (const r of records) {
    const s = states.get(r.id)!
    const sum = (out[r.dogId] ??= { state: 'none', overdue: 0, dueSoon: 0, next: null })
    sum.state = worstDueState([sum.state, s.state])
    if (s.state === 'overdue') sum.overdue++
    if (s.state === 'due-soon') sum.dueSoon++
    if ((s.state === 'overdue' || s.state === 'due-soon') && r.dueOn && (!sum.next || r.dueOn < sum.next.dueOn)) {
      sum.next = { name: r.name, dueOn: r.dueOn }
    }
  }
  return out
}

export const EMPTY_HEALTH_SUMMARY: DogHealthSummary = Object.freeze({ state: 'none', overdue: 0, dueSoon: 0, next: null }) as DogHealthSummary

/** One line for a flag: "1 overdue, 2 due soon", or null when nothing needs attention. */
export function healthFlagText(summary: DogHealthSummary): string | null {
  const bits = []
  if (summary.overdue) bits.push(`${summary.overdue} overdue`)
  if (summary.dueSoon) bits.push(`${summary.dueSoon} due soon`)
  return bits.length ? bits.join(', ') : null
}

// ---------------------------------------------------------------------------------------------------------------
// Suitability assessment

/**
 * The traits a trainer scores before accepting a dog (common practice in selecting scent-detection and alert dogs;
 * the list and its wording are ours). Each is scored 1 (very low) to 5 (very high); higher is always better.
 */
export const SUITABILITY_TRAITS = [
  { key: 'scentDrive', label: 'Scent drive', description: 'Keeps working a scent puzzle on their own, nose down, without being urged on.' },
  { key: 'focus', label: 'Focus', description: 'Stays on a task for several minutes and comes back to it after a distraction.' },
  { key: 'environmentalConfidence', label: 'Environmental confidence', description: 'Moves calmly over new floors, stairs, crowds and traffic noise.' },
  { key: 'sociability', label: 'Sociability', description: 'Friendly and relaxed with strangers, children and other dogs, without over-excitement.' },
  { key: 'startleRecovery', label: 'Recovery from startle', description: 'After a sudden noise or movement, settles and carries on within a few seconds.' },
  { key: 'handlerEngagement', label: 'Handler engagement', description: 'Checks in with the handler, offers attention and enjoys working together.' },
] as const
export type TraitKey = (typeof SUITABILITY_TRAITS)[number]['key']
export const TRAIT_KEYS = SUITABILITY_TRAITS.map(t => t.key) as [TraitKey, ...TraitKey[]]

export const TRAIT_SCORE_MIN = 1
export const TRAIT_SCORE_MAX = 5
export const TRAIT_SCORE_LABELS: Record<number, string> = { 1: 'Very low', 2: 'Low', 3: 'Moderate', 4: 'High', 5: 'Very high' }
/**
 * A trait scored below this deserves a second look before the dog is accepted. Our own choice: "moderate" (3) is
 * the least a dog can work with; accepting a dog with a lower score asks the trainer to say why in the notes.
 */
export const MIN_TRAIT_SCORE = 3

export type TraitScores = Partial<Record<TraitKey, number>>

export interface AssessmentSummary {
  /** Mean of the scored traits, rounded to one decimal; null when nothing is scored. */
  average: number | null
  scored: number
  complete: boolean
  /** The lowest-scored trait (the first in the list on a tie). */
  lowest: { key: TraitKey, label: string, score: number } | null
  /** Traits scored below MIN_TRAIT_SCORE, in list order. */
  belowMinimum: TraitKey[]
  anyBelowMinimum: boolean
}

export function assessmentSummary(scores: TraitScores, minimum = MIN_TRAIT_SCORE): AssessmentSummary {
  let sum = 0, scored = 0
  let lowest: AssessmentSummary['lowest'] = null
  const belowMinimum: TraitKey[] = []
  for (const t of SUITABILITY_TRAITS) {
    const s = scores[t.key]
    if (typeof s !== 'number' || !Number.isFinite(s)) continue
    sum += s
    scored++
    if (!lowest || s < lowest.score) lowest = { key: t.key, label: t.label, score: s }
    if (s < minimum) belowMinimum.push(t.key)
  }
  return {
    average: scored ? Math.round((sum / scored) * 10) / 10 : null,
    scored,
    complete: scored === SUITABILITY_TRAITS.length,
    lowest,
    belowMinimum,
    anyBelowMinimum: belowMinimum.length > 0,
  }
}

export const ASSESSMENT_OUTCOMES = ['accept', 'decline', 'reassess'] as const
export type AssessmentOutcome = (typeof ASSESSMENT_OUTCOMES)[number]
export const ASSESSMENT_OUTCOME_LABELS: Record<AssessmentOutcome, string> = {
  accept: 'Accept into the programme',
  decline: 'Decline',
  reassess: 'Assess again later',
}
export const ASSESSMENT_OUTCOME_SHORT: Record<AssessmentOutcome, string> = { accept: 'Accepted', decline: 'Declined', reassess: 'Assess again' }

// ---------------------------------------------------------------------------------------------------------------
// Status changes

export const ACCEPT_BEFORE_TRAINING = "Record a suitability assessment with the outcome 'accept' before the dog starts training."
export const ACCEPT_BEFORE_PLACING = "Record a suitability assessment with the outcome 'accept' before the dog is placed."

export interface StatusContext {
  name: string
  current: DogStatus
  /** effectiveOn of the latest recorded change, if any. */
  latestChangeOn: string | null
  /** Outcome of the latest assessment, if any. */
  latestAssessmentOutcome: AssessmentOutcome | null
  dateOfBirth: string | null
}

/** Why a status change may not be recorded, keyed by form field; empty when it may. */
export function statusChangeProblems(ctx: StatusContext, change: { status: DogStatus, effectiveOn: string }, today: string): Record<string, string> {
  const out: Record<string, string> = {}
  if (change.effectiveOn > today) {
    out.effectiveOn = `A status change cannot be dated in the future (today is ${today}). Record it on or after the day it happens.`
  }
  else if (ctx.latestChangeOn && change.effectiveOn < ctx.latestChangeOn) {
    out.effectiveOn = `The latest status change is dated ${ctx.latestChangeOn}. Date this one on or after that day, so the history stays in order.`
  }
  else if (ctx.dateOfBirth && change.effectiveOn < ctx.dateOfBirth) {
    out.effectiveOn = `This date is before ${ctx.name}'s date of birth (${ctx.dateOfBirth}).`
  }
  if (change.status === ctx.current) {
    out.status = `${ctx.name} is already in the status '${DOG_STATUS_LABELS[ctx.current].toLowerCase()}'. Choose a different status.`
  }
  else if (ctx.current === 'assessment' && ctx.latestAssessmentOutcome !== 'accept') {
    if (change.status === 'in-training') out.status = ACCEPT_BEFORE_TRAINING
    if (change.status === 'placed') out.status = ACCEPT_BEFORE_PLACING
  }
  return out
}

/** Why a recorded day may not be used (a health record or an assessment), or null: not in the future, not before birth. */
export function pastDayProblem(day: string, today: string, dateOfBirth: string | null, what: string): string | null {
  if (day > today) return `${what} cannot be in the future (today is ${today}).`
  if (dateOfBirth && day < dateOfBirth) return `${what} is before the dog's date of birth (${dateOfBirth}).`
  return null
}

// ---------------------------------------------------------------------------------------------------------------
// Display

/** '2026-03-31' → '31 Mar 2026' (a calendar day, shown the same in every time zone). */
export function formatCalendarDay(day: string | null | undefined, locale = 'en-GB'): string {
  return day && parts(day) ? formatDay(day, 'medium', locale) : '—'
}

/** '999000000010001' → '999 000 000 010 001', easier to read against a scanner's display. */
export function formatMicrochip(chip: string | null | undefined): string {
  if (!chip) return '—'
  return /^\d{15}$/.test(chip) ? chip.replace(/(\d{3})(?=\d)/g, '$1 ') : chip
}

/** Where a dog's profile opens for a role. */
export function dogProfilePath(role: 'admin' | 'trainer' | 'handler', dogId: string): string {
  return `/${role}/dogs/${dogId}`
}
