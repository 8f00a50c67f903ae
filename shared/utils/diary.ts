// The real-life alert diary around the matching in ./alerts: entry kinds and scales, the window that applies to a
// client, a recent period's figures, the lead times by month for the chart, and the refresher follow-up rule.
// Pure functions: no database, no HTTP, no framework imports.
//
// Caution: an alert dog supplements and never replaces medical care; the person acts on their clinician's advice,
// not only on the dog. These figures describe the dog's record, nothing more.

import { diaryTotals, matchAlerts, summariseDiary, type AlertWindow, type DiaryMatch, type MatchOptions, type MatchedEpisode } from './alerts'
import { TZDate } from '@date-fns/tz'
import type { Condition } from './enums'
import { quantile } from './stats'

export const DIARY_KINDS = ['alert', 'episode'] as const
export type DiaryKind = (typeof DIARY_KINDS)[number]

/** How sure the handler was that the dog was alerting (a simple three-step scale, our own). */
export const ALERT_CONFIDENCES = ['unsure', 'fairly-sure', 'sure'] as const
export type AlertConfidence = (typeof ALERT_CONFIDENCES)[number]
export const ALERT_CONFIDENCE_LABELS: Record<AlertConfidence, string> = {
  unsure: 'Not sure it was an alert',
  'fairly-sure': 'Fairly sure',
  sure: 'Sure it was an alert',
}

/** Episode severity on a simple three-step scale (common practice in symptom diaries). */
export const EPISODE_SEVERITIES = ['mild', 'moderate', 'severe'] as const
export type EpisodeSeverity = (typeof EPISODE_SEVERITIES)[number]
export const EPISODE_SEVERITY_LABELS: Record<EpisodeSeverity, string> = {
  mild: 'Mild: could carry on',
  moderate: 'Moderate: had to stop',
  severe: 'Severe: needed help or treatment',
}

/** What the dog commonly does to alert, offered as suggestions (the handler may write anything; common practice). */
export const ALERT_BEHAVIOUR_SUGGESTIONS = ['Nudged me', 'Pawed at me', 'Stared and would not settle', 'Brought the alert toy', 'Jumped up', 'Whined', 'Fetched a family member']

/** The plural noun the summary sentence uses for a condition's episodes. */
export const CONDITION_EPISODE_NOUNS: Record<Condition, string> = {
  migraine: 'migraines',
  hypoglycaemia: 'low blood sugar episodes',
  seizure: 'seizures',
  other: 'episodes',
}

/** An entry may be up to this far ahead of the server's clock (phone clocks drift; our own allowance). */
export const FUTURE_SKEW_MINUTES = 5
/** Diary times earlier than this are typing mistakes (our own bound). */
export const EARLIEST_DIARY_TIME = Date.UTC(2000, 0, 1)

/** A window is valid when 0 ≤ min ≤ max ≤ maxAllowed (whole minutes); returns a message per field, empty when fine. */
export const MAX_WINDOW_MINUTES = 24 * 60 // a day: longer than any warning the trade credits to a dog (common practice)
export function windowProblems(window: { minMinutes: number, maxMinutes: number }): Record<string, string> {
  const out: Record<string, string> = {}
  const { minMinutes, maxMinutes } = window
  if (!Number.isInteger(minMinutes) || minMinutes < 0) out.minMinutes = 'Use a whole number of minutes, 0 or more.'
  if (!Number.isInteger(maxMinutes) || maxMinutes < 1 || maxMinutes > MAX_WINDOW_MINUTES) {
    out.maxMinutes = `Use a whole number of minutes from 1 to ${MAX_WINDOW_MINUTES}.`
  }
  if (!out.minMinutes && !out.maxMinutes && minMinutes > maxMinutes) {
    out.minMinutes = `The earliest-counted end (${minMinutes} min) must not be more than the latest (${maxMinutes} min) before onset.`
  }
  return out
}

/** The window for a client: the trainer's own for this client if set, else the business policy for the condition. */
export function effectiveWindow(
  override: AlertWindow | null | undefined,
  policy: Record<Condition, AlertWindow>,
  condition: Condition,
): { window: AlertWindow, source: 'client' | 'policy' } {
  if (override) return { window: { minMinutes: override.minMinutes, maxMinutes: override.maxMinutes }, source: 'client' }
  return { window: { ...policy[condition] }, source: 'policy' }
}

export interface DiaryPoint { id: string, kind: DiaryKind, occurredAt: Date }

/**
 * Splits diary entries into the alerts and episodes matchAlerts takes, and matches them (each alert credited to its
 * next episode only; `options.minLeadMinutes` from the diary policy). Every figure of the diary — the summary, the
 * chart by month, the roster column and the refresher check — comes from this one matching.
 */
export function matchEntries(entries: readonly DiaryPoint[], window: AlertWindow, options: MatchOptions = {}): DiaryMatch {
  const alerts = entries.filter(e => e.kind === 'alert').map(e => ({ id: e.id, at: e.occurredAt }))
  const episodes = entries.filter(e => e.kind === 'episode').map(e => ({ id: e.id, onsetAt: e.occurredAt }))
  return matchAlerts(alerts, episodes, window, options)
}

export const DAY_MS = 86_400_000

/**
 * The figures of a recent period: episodes with onset at or after `since`, alerts at or after `since`, each keeping
 * what the whole diary's matching found (an alert just before `since` still warns of an episode just after it, but is
 * not counted among the period's alerts).
 */
export function periodTotals(entries: readonly DiaryPoint[], match: DiaryMatch, since: Date): DiaryMatch['totals'] {
  const at = new Map(entries.map(e => [e.id, e.occurredAt.getTime()]))
  const from = since.getTime()
  const inPeriod = (id: string) => (at.get(id) ?? -Infinity) >= from
  return diaryTotals(match.alerts.filter(a => inPeriod(a.id)), match.episodes.filter(e => inPeriod(e.id)))
}

/** The sentence for a period, with its condition's noun: "your" for the household, "the person's" for the trainer. */
export function periodSentence(totals: DiaryMatch['totals'], condition: Condition, audience: 'handler' | 'staff' = 'handler'): string {
  return summariseDiary({ alerts: [], episodes: [], totals }, CONDITION_EPISODE_NOUNS[condition], audience === 'handler' ? 'your' : 'the person\'s')
}

/** The calendar month (YYYY-MM) of an instant in a time zone (UTC when the zone is unknown). */
export function monthInTimeZone(instant: Date, timeZone: string): string {
  let fmt: Intl.DateTimeFormat
  try {
    fmt = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit' })
  }
  catch {
    fmt = new Intl.DateTimeFormat('en-CA', { timeZone: 'UTC', year: 'numeric', month: '2-digit' })
  }
  const p = Object.fromEntries(fmt.formatToParts(instant).map(x => [x.type, x.value]))
  return `${p.year}-${p.month}`
}

export interface LeadMonth {
  month: string
  episodes: number
  warned: number
  /** Lead times of the month's warned episodes in minutes, by onset. */
  leads: number[]
  median: number | null
  q1: number | null
  q3: number | null
}

/**
 * Lead times grouped by the calendar month of each episode's onset in `timeZone`, oldest month first, with every
 * month between the first and the last present (empty months have 0 episodes), so a drift over time shows.
 */
export function leadTimesByMonth(entries: readonly DiaryPoint[], match: DiaryMatch, timeZone: string): LeadMonth[] {
  const onset = new Map(entries.filter(e => e.kind === 'episode').map(e => [e.id, e.occurredAt]))
  const episodes = match.episodes.filter(e => onset.has(e.id))
    .sort((a, b) => onset.get(a.id)!.getTime() - onset.get(b.id)!.getTime())
  const byMonth = new Map<string, MatchedEpisode[]>()
  for (const e of episodes) {
    const key = monthInTimeZone(onset.get(e.id)!, timeZone)
    if (!byMonth.has(key)) byMonth.set(key, [])
    byMonth.get(key)!.push(e)
  }
  const keys = [...byMonth.keys()]
  if (!keys.length) return []
  const out: LeadMonth[] = []
  let [y, m] = keys[0]!.split('-').map(Number) as [number, number]
  const last = keys.at(-1)!
  for (;;) {
    const key = `${y}-${String(m).padStart(2, '0')}`
    const list = byMonth.get(key) ?? []
    const leads = list.flatMap(e => (e.leadMinutes === null ? [] : [e.leadMinutes]))
    out.push({ month: key, episodes: list.length, warned: leads.length, leads, median: quantile(leads, 0.5), q1: quantile(leads, 0.25), q3: quantile(leads, 0.75) })
    if (key === last) break
    m++
    if (m === 13) { m = 1; y++ }
  }
  return out
}

/** The follow-up policy: when the recent warned-of share is below the threshold, the trainer is asked to plan a refresher. */
export interface RefresherPolicy {
  /** The recent period, in days back from now. */
  recentDays: number
  /** Fewer episodes than this in the period and no conclusion is drawn. */
  minRecentEpisodes: number
  /** Below this share (percent) of recent episodes warned of, a refresher is suggested. */
  refresherBelowPercent: number
}

export interface RefresherCheck {
  due: boolean
  recentEpisodes: number
  recentWarned: number
  /** 0..1, null with no recent episodes. */
  recentShare: number | null
  /** The share before the recent period (all earlier episodes), for the message; null when none. */
  earlierShare: number | null
  /** Dedupe bucket: one e-mail per client per recentDays-long stretch of calendar time (counted from the epoch). */
  bucket: number
}

/**
 * Rule: due when the period [now - recentDays days, now] holds at least minRecentEpisodes episodes and fewer than
 * refresherBelowPercent % of them were warned of. The check looks only at the diary as it stands, so it can run
 * after every change; the caller de-duplicates with `bucket` so the trainer hears once per stretch.
 */
export function refresherCheck(entries: readonly DiaryPoint[], match: DiaryMatch, policy: RefresherPolicy, now: Date): RefresherCheck {
  const since = now.getTime() - policy.recentDays * DAY_MS
  const onset = new Map(entries.filter(e => e.kind === 'episode').map(e => [e.id, e.occurredAt.getTime()]))
  const recent = match.episodes.filter(e => (onset.get(e.id) ?? -Infinity) >= since && onset.get(e.id)! <= now.getTime())
  const earlier = match.episodes.filter(e => (onset.get(e.id) ?? Infinity) < since)
  const share = (list: MatchedEpisode[]) => (list.length ? list.filter(e => e.warned).length / list.length : null)
  const recentShare = share(recent)
  const due = recent.length >= policy.minRecentEpisodes && recentShare !== null && recentShare * 100 < policy.refresherBelowPercent
  return {
    due,
    recentEpisodes: recent.length,
    recentWarned: recent.filter(e => e.warned).length,
    recentShare,
    earlierShare: share(earlier),
    bucket: Math.floor(now.getTime() / (policy.recentDays * DAY_MS)),
  }
}

/** A share as a whole percentage, "75%". */
export function percent(share: number): string {
  return `${Math.round(share * 100)}%`
}

/** The time zone if Intl knows it, else UTC. */
export function knownTimeZone(timeZone: string | null | undefined): string {
  if (!timeZone) return 'UTC'
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone })
    return timeZone
  }
  catch {
    return 'UTC'
  }
}

/** The "YYYY-MM-DDTHH:mm" a datetime-local input shows for an instant, on the wall clock of `timeZone`. */
export function localInputValue(instant: Date, timeZone: string): string {
  const z = new TZDate(instant.getTime(), knownTimeZone(timeZone))
  const two = (n: number) => String(n).padStart(2, '0')
  return `${z.getFullYear()}-${two(z.getMonth() + 1)}-${two(z.getDate())}T${two(z.getHours())}:${two(z.getMinutes())}`
}

/**
 * The instant a datetime-local value ("YYYY-MM-DDTHH:mm") names on the wall clock of `timeZone`, or null when it is
 * not a valid value. Daylight-saving changes, decided here rather than left to a library:
 * - in the hour that does not exist when clocks go forward, the time is read with the offset in force before the
 *   change, so it moves on by the gap (01:30 in London on the spring change is 02:30 BST, 01:30 UTC);
 * - in the hour that repeats when clocks go back, the FIRST occurrence is taken (01:30 in London on the autumn
 *   change is 01:30 BST, 00:30 UTC); the person can still pick the second by editing the time after the change.
 */
export function instantFromLocalInput(value: string, zone: string): Date | null {
  const timeZone = knownTimeZone(zone)
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(value.trim())
  if (!m) return null
  const [y, mo, d, h, mi] = m.slice(1).map(Number) as [number, number, number, number, number]
  const wall = Date.UTC(y, mo - 1, d, h, mi)
  const probe = new Date(wall)
  if (probe.getUTCFullYear() !== y || probe.getUTCMonth() !== mo - 1 || probe.getUTCDate() !== d || h > 23 || mi > 59) return null
  // Offsets (local - UTC, minutes) a day either side of the wall time: any change falls between them.
  const offsetAt = (ms: number) => -new TZDate(ms, timeZone).getTimezoneOffset()
  const before = offsetAt(wall - DAY_MS)
  const after = offsetAt(wall + DAY_MS)
  const text = value.trim()
  const candidates = [...new Set([before, after])].map(o => wall - o * 60_000)
    .filter(ms => localInputValue(new Date(ms), timeZone) === text).sort((a, b) => a - b)
  return new Date(candidates[0] ?? wall - before * 60_000)
}

