// Real-life alert diary: matching the dog's alerts logged at home against the episodes that followed, and saying
// what that shows in plain language. Pure functions: no database, no HTTP, no framework imports.
//
// Caution: an alert dog supplements and never replaces medical care. These figures describe the dog's record; the
// person follows their clinician's advice on monitoring and treatment.

import type { Condition } from './enums'
import { quantile, wilsonInterval, type ProportionInterval } from './stats'

/** An alert the dog gave in daily life, at an instant. */
export interface DiaryAlert {
  id: string
  at: Date
}

/** An episode (a migraine, a low, a seizure), with the instant its first symptoms began or it was measured. */
export interface DiaryEpisode {
  id: string
  onsetAt: Date
}

/**
 * How long before an episode's onset an alert counts as a warning of it: an alert at time t counts for an episode
 * with onset o when  o - maxMinutes ≤ t ≤ o - minMinutes  (both ends included).
 */
export interface AlertWindow {
  minMinutes: number
  maxMinutes: number
}

/**
 * Default warning windows by condition. A trainer sets the window per client; these are starting points only,
 * to be agreed with the person and, where relevant, their clinician.
 */
export const DEFAULT_ALERT_WINDOWS: Record<Condition, AlertWindow> = {
  // Up to 4 h: the changes before a migraine headache can begin hours ahead, and alerts counted as warnings
  // are commonly accepted up to a few hours before the first symptoms (common practice).
  migraine: { minMinutes: 0, maxMinutes: 240 },
  // Up to 1 h: a falling blood glucose reaches a low within the hour the dog is expected to warn of; an alert
  // more than an hour before a low reading is not usually credited to it (common practice).
  hypoglycaemia: { minMinutes: 0, maxMinutes: 60 },
  // Up to 1 h: alerts reported before seizures range from seconds to tens of minutes ahead (from memory).
  seizure: { minMinutes: 0, maxMinutes: 60 },
  // Up to 2 h for other conditions, a middle value until the trainer sets one (common practice).
  other: { minMinutes: 0, maxMinutes: 120 },
}

/**
 * Fewer episodes than this and the diary is too short to judge how reliably the dog warns (common practice).
 */
export const MIN_EPISODES_FOR_EVIDENCE = 10

/**
 * The least lead an alert needs to count as a warning: an alert logged less than this before onset (typically in
 * the same minute, because the handler tapped both buttons together) warned of nothing in time. A policy (setting
 * `diary`, `minLeadMinutes`); 1 minute by default (common practice).
 */
export const DEFAULT_MIN_LEAD_MINUTES = 1

/** What one alert turned out to be. */
export type AlertOutcome = 'warning' | 'at-onset' | 'false'

export interface MatchedAlert {
  id: string
  /** 'warning': its next episode's onset came within the window; 'at-onset': too close to onset to warn (see
   *  matchAlerts); 'false': no episode followed within the window. */
  outcome: AlertOutcome
  /** The one episode this alert is credited to (its next episode), for a warning or an alert at onset; else null. */
  episodeId: string | null
  /** outcome === 'warning'. */
  isTrue: boolean
}

export interface MatchedEpisode {
  id: string
  /** Alerts credited to this episode as warnings, by time (earliest first). */
  alertIds: string[]
  /** Alerts at this episode's onset (too late to warn), by time. */
  atOnsetAlertIds: string[]
  warned: boolean
  /** Minutes from the earliest warning to onset; null when not warned of. */
  leadMinutes: number | null
}

export interface LeadTimeSummary {
  median: number
  q1: number
  q3: number
}

export interface DiaryMatch {
  alerts: MatchedAlert[]
  episodes: MatchedEpisode[]
  totals: {
    alerts: number
    episodes: number
    /** Alerts that warned of an episode (true positives). */
    trueAlerts: number
    /** Alerts at onset: an episode followed, but too soon to be a warning. Shown apart; not true alerts. */
    atOnsetAlerts: number
    /** Alerts with no episode in the window after them (false positives). alerts = true + at onset + false. */
    falseAlerts: number
    warnedEpisodes: number
    /** Sensitivity: episodes warned of / episodes (Wilson interval), null with no episodes. */
    warnedShare: ProportionInterval | null
    /** Positive predictive value: true alerts / alerts (Wilson interval), null with no alerts. */
    positivePredictiveValue: ProportionInterval | null
    /** Median and quartiles (type-7 quantiles) of the lead times of warned episodes; null when none. */
    leadMinutes: LeadTimeSummary | null
  }
}

const MS_PER_MINUTE = 60_000

/** Throws RangeError unless the window is finite with 0 ≤ minMinutes ≤ maxMinutes. */
export function validateAlertWindow(window: AlertWindow): void {
  const { minMinutes, maxMinutes } = window
  if (!Number.isFinite(minMinutes) || !Number.isFinite(maxMinutes)) {
    throw new RangeError(
      `Alert window: minMinutes and maxMinutes must be finite numbers of minutes (got ${minMinutes} and ${maxMinutes}).`,
    )
  }
  if (minMinutes < 0) {
    throw new RangeError(`Alert window: minMinutes must be 0 or more (got ${minMinutes}).`)
  }
  if (minMinutes > maxMinutes) {
    throw new RangeError(
      `Alert window: minMinutes (${minMinutes}) must not be greater than maxMinutes (${maxMinutes}).`,
    )
  }
}

function instantOf(value: Date, what: string): number {
  const time = value instanceof Date ? value.getTime() : Number.NaN
  if (Number.isNaN(time)) throw new RangeError(`${what} has an invalid date.`)
  return time
}

function checkUniqueIds(items: readonly { id: string }[], what: string): void {
  const seen = new Set<string>()
  for (const { id } of items) {
    if (seen.has(id)) throw new RangeError(`${what} id "${id}" appears more than once.`)
    seen.add(id)
  }
}

export interface MatchOptions {
  /** The least lead of a warning, in minutes (policy; DEFAULT_MIN_LEAD_MINUTES when left out). */
  minLeadMinutes?: number
}

/**
 * Matches diary alerts to episodes. One alert is credited to at most one episode: its NEXT episode.
 *
 * Rules, with m = minLeadMinutes and nearest = max(window.minMinutes, m):
 * - An alert's next episode is the earliest onset o with o ≥ t, or o > t − m when m > 0 (an onset logged less than
 *   m minutes before the alert is the same moment: the handler tapped both buttons together). Ties in onset: the
 *   first in input order. Later episodes are never credited with this alert, however close they follow.
 * - lead = o − t. With nearest ≤ lead ≤ window.maxMinutes (both ends included) the alert is a WARNING of that
 *   episode (a true alert). With lead < nearest it is an alert AT ONSET: an episode came, but too soon for the
 *   alert to have warned; it is listed against the episode apart from warnings. Otherwise (no next episode, or it
 *   came later than maxMinutes) the alert is FALSE.
 * - An episode is warned of when at least one warning is credited to it; its lead time runs from its earliest
 *   warning to onset, in minutes (not rounded). An earlier episode can never "take" an alert that came after it.
 * - Totals: warnedShare (sensitivity) = warned episodes / episodes; positivePredictiveValue = true alerts / alerts
 *   (alerts at onset count as alerts that did not warn), each with its 95% Wilson interval (Altman & Bland 1994,
 *   BMJ 309:102 for PPV); leadMinutes = median and quartiles (type-7) of the warned episodes' lead times.
 *
 * Alerts and episodes may come in any order; the output lists them in input order. All arithmetic is on UTC
 * instants (Date.getTime()), so time zones and daylight-saving changes cannot shift anything.
 *
 * Throws RangeError for an invalid window (see validateAlertWindow) or minimum lead, an invalid Date, or a
 * repeated id.
 */
export function matchAlerts(
  alerts: readonly DiaryAlert[],
  episodes: readonly DiaryEpisode[],
  window: AlertWindow,
  options: MatchOptions = {},
): DiaryMatch {
  validateAlertWindow(window)
  const minLead = options.minLeadMinutes ?? DEFAULT_MIN_LEAD_MINUTES
  if (!Number.isFinite(minLead) || minLead < 0) {
    throw new RangeError(`The least lead of a warning must be 0 or more minutes (got ${minLead}).`)
  }
  checkUniqueIds(alerts, 'Alert')
  checkUniqueIds(episodes, 'Episode')
  const alertTimes = alerts.map((alert) => instantOf(alert.at, `Alert "${alert.id}"`))
  const onsetTimes = episodes.map((episode) => instantOf(episode.onsetAt, `Episode "${episode.id}"`))
  const minLeadMs = Math.round(minLead * MS_PER_MINUTE)
  const nearestMs = Math.max(window.minMinutes * MS_PER_MINUTE, minLeadMs)
  const maxMs = window.maxMinutes * MS_PER_MINUTE

  // Episode indices by onset (ties keep input order), searched for each alert's next episode.
  const byOnset = episodes.map((_, index) => index).sort((a, b) => (onsetTimes[a] as number) - (onsetTimes[b] as number) || a - b)
  const firstOnsetAtOrAfter = (time: number): number => {
    let low = 0
    let high = byOnset.length
    while (low < high) {
      const middle = (low + high) >>> 1
      if ((onsetTimes[byOnset[middle] as number] as number) < time) low = middle + 1
      else high = middle
    }
    return low
  }

  const warnings: number[][] = episodes.map(() => [])
  const atOnset: number[][] = episodes.map(() => [])
  const matchedAlerts: MatchedAlert[] = alerts.map((alert, alertIndex) => {
    const at = alertTimes[alertIndex] as number
    // Onset ≥ at, or within the last minLead before it (times are whole milliseconds: o > t − m ⇔ o ≥ t − m + 1).
    const k = firstOnsetAtOrAfter(minLeadMs > 0 ? at - minLeadMs + 1 : at)
    const next = byOnset[k]
    if (next === undefined) return { id: alert.id, outcome: 'false', episodeId: null, isTrue: false }
    const lead = (onsetTimes[next] as number) - at
    if (lead > maxMs) return { id: alert.id, outcome: 'false', episodeId: null, isTrue: false }
    const episodeId = (episodes[next] as DiaryEpisode).id
    if (lead < nearestMs) {
      ;(atOnset[next] as number[]).push(alertIndex)
      return { id: alert.id, outcome: 'at-onset', episodeId, isTrue: false }
    }
    ;(warnings[next] as number[]).push(alertIndex)
    return { id: alert.id, outcome: 'warning', episodeId, isTrue: true }
  })

  const byTime = (list: number[]) => [...list].sort((a, b) => (alertTimes[a] as number) - (alertTimes[b] as number) || a - b)
  const matchedEpisodes: MatchedEpisode[] = episodes.map((episode, episodeIndex) => {
    const indices = byTime(warnings[episodeIndex] as number[])
    const earliest = indices[0]
    const leadMinutes =
      earliest === undefined
        ? null
        : ((onsetTimes[episodeIndex] as number) - (alertTimes[earliest] as number)) / MS_PER_MINUTE
    return {
      id: episode.id,
      alertIds: indices.map((index) => (alerts[index] as DiaryAlert).id),
      atOnsetAlertIds: byTime(atOnset[episodeIndex] as number[]).map((index) => (alerts[index] as DiaryAlert).id),
      warned: earliest !== undefined,
      leadMinutes,
    }
  })

  return { alerts: matchedAlerts, episodes: matchedEpisodes, totals: diaryTotals(matchedAlerts, matchedEpisodes) }
}

/**
 * The totals of matched alerts and episodes (any subset of one matchAlerts result, e.g. a recent period: an
 * alert keeps its outcome and an episode its lead from the whole diary's matching).
 */
export function diaryTotals(alerts: readonly MatchedAlert[], episodes: readonly MatchedEpisode[]): DiaryMatch['totals'] {
  const trueAlerts = alerts.filter((alert) => alert.outcome === 'warning').length
  const atOnsetAlerts = alerts.filter((alert) => alert.outcome === 'at-onset').length
  const warnedEpisodes = episodes.filter((episode) => episode.warned).length
  const leads = episodes.flatMap((episode) => (episode.leadMinutes === null ? [] : [episode.leadMinutes]))
  const leadMedian = quantile(leads, 0.5)
  return {
    alerts: alerts.length,
    episodes: episodes.length,
    trueAlerts,
    atOnsetAlerts,
    falseAlerts: alerts.length - trueAlerts - atOnsetAlerts,
    warnedEpisodes,
    warnedShare: wilsonInterval(warnedEpisodes, episodes.length),
    positivePredictiveValue: wilsonInterval(trueAlerts, alerts.length),
    leadMinutes:
      leadMedian === null
        ? null
        : { median: leadMedian, q1: quantile(leads, 0.25) as number, q3: quantile(leads, 0.75) as number },
  }
}

/**
 * A duration in plain words, rounded to the whole minute: "45 min", "1 h 40 min", "2 h"; under half a minute,
 * "less than a minute".
 */
export function formatDuration(minutes: number): string {
  if (!Number.isFinite(minutes) || minutes < 0) {
    throw new RangeError(`formatDuration: minutes must be 0 or more (got ${minutes}).`)
  }
  const whole = Math.round(minutes)
  if (whole === 0) return 'less than a minute'
  const hours = Math.floor(whole / 60)
  const rest = whole % 60
  if (hours === 0) return `${rest} min`
  return rest === 0 ? `${hours} h` : `${hours} h ${rest} min`
}

/**
 * One or two plain-language sentences for the handler, e.g. "The dog warned of 9 of your last 12 migraines, on
 * average about 1 h 40 min before the first symptoms." "On average about" is the median lead time. When fewer
 * than MIN_EPISODES_FOR_EVIDENCE episodes are logged, a note says the diary is too short to judge by.
 *
 * `conditionLabel` is the plural noun for the episodes as it should read in the sentence ("migraines",
 * "low blood sugar episodes", "seizures"); `whose` is "your" for the handler, e.g. "the person's" for the trainer.
 */
export function summariseDiary(result: DiaryMatch, conditionLabel: string, whose = 'your'): string {
  const { episodes, warnedEpisodes, leadMinutes } = result.totals
  const label = conditionLabel.trim()
  if (episodes === 0) {
    return `No ${label} are logged yet, so there is nothing yet to measure the dog's warnings against.`
  }

  const before = leadMinutes === null ? '' : `${formatDuration(leadMinutes.median)} before the first symptoms`
  let sentence: string
  if (episodes === 1) {
    sentence =
      warnedEpisodes === 1
        ? `One of ${whose} ${label} is logged so far, and the dog warned of it about ${before}.`
        : `One of ${whose} ${label} is logged so far, and the dog did not warn of it.`
  } else if (warnedEpisodes === 0) {
    sentence = `The dog did not warn of any of ${whose} last ${episodes} ${label}.`
  } else {
    sentence = `The dog warned of ${warnedEpisodes} of ${whose} last ${episodes} ${label}, on average about ${before}.`
  }

  if (episodes < MIN_EPISODES_FOR_EVIDENCE) {
    const count = episodes === 1 ? 'Only 1 episode is' : `Only ${episodes} episodes are`
    sentence += ` ${count} logged so far: at least ${MIN_EPISODES_FOR_EVIDENCE} are needed before these figures say much about how reliably the dog warns.`
  }
  return sentence
}
