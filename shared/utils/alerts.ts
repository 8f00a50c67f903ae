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

export interface MatchedAlert {
  id: string
  /** Episodes whose window this alert falls in, by onset (earliest first). */
  matchedEpisodeIds: string[]
  isTrue: boolean
}

export interface MatchedEpisode {
  id: string
  /** Alerts in this episode's window, by time (earliest first). */
  alertIds: string[]
  warned: boolean
  /** Minutes from the earliest alert in the window to onset; null when not warned of. */
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
    trueAlerts: number
    warnedEpisodes: number
    /** Share of episodes warned of (Wilson interval), null with no episodes. */
    warnedShare: ProportionInterval | null
    /** Share of alerts that were true (Wilson interval), null with no alerts. */
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

/**
 * Matches diary alerts to episodes.
 *
 * Rules:
 * - An alert at time t falls in the window of an episode with onset o when o - maxMinutes ≤ t ≤ o - minMinutes,
 *   both ends included. An alert after onset - minMinutes (in particular after onset) never counts.
 * - An alert is true when at least one episode's window holds it. If the windows of two close episodes both hold
 *   it, it counts once as a true alert (trueAlerts counts alerts, not pairs) and is listed against both episodes,
 *   so each of them is warned of: the dog's one warning preceded both.
 * - An episode is warned of when at least one alert falls in its window. Its lead time is from its EARLIEST alert
 *   in the window to onset, in minutes (not rounded).
 * - Totals: positivePredictiveValue = true alerts / alerts; warnedShare = warned episodes / episodes, each with
 *   its 95% Wilson interval; leadMinutes = median and quartiles (type-7) of the warned episodes' lead times.
 *
 * Alerts and episodes may come in any order; the output lists them in input order. All arithmetic is on UTC
 * instants (Date.getTime()), so time zones and daylight-saving changes cannot shift anything.
 *
 * Throws RangeError for an invalid window (see validateAlertWindow), an invalid Date, or a repeated id.
 */
export function matchAlerts(
  alerts: readonly DiaryAlert[],
  episodes: readonly DiaryEpisode[],
  window: AlertWindow,
): DiaryMatch {
  validateAlertWindow(window)
  checkUniqueIds(alerts, 'Alert')
  checkUniqueIds(episodes, 'Episode')
  const alertTimes = alerts.map((alert) => instantOf(alert.at, `Alert "${alert.id}"`))
  const onsetTimes = episodes.map((episode) => instantOf(episode.onsetAt, `Episode "${episode.id}"`))
  const minMs = window.minMinutes * MS_PER_MINUTE
  const maxMs = window.maxMinutes * MS_PER_MINUTE

  // Episode indices by onset (ties keep input order), so each alert looks only at the onsets that can match it:
  // at + min ≤ onset ≤ at + max.
  const byOnset = episodes.map((_, index) => index).sort((a, b) => (onsetTimes[a] as number) - (onsetTimes[b] as number))
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

  const episodeAlertIndices: number[][] = episodes.map(() => [])
  const matchedAlerts: MatchedAlert[] = alerts.map((alert, alertIndex) => {
    const at = alertTimes[alertIndex] as number
    const matchedEpisodeIds: string[] = []
    for (let k = firstOnsetAtOrAfter(at + minMs); k < byOnset.length; k++) {
      const episodeIndex = byOnset[k] as number
      if ((onsetTimes[episodeIndex] as number) > at + maxMs) break
      matchedEpisodeIds.push((episodes[episodeIndex] as DiaryEpisode).id)
      ;(episodeAlertIndices[episodeIndex] as number[]).push(alertIndex)
    }
    return { id: alert.id, matchedEpisodeIds, isTrue: matchedEpisodeIds.length > 0 }
  })

  const matchedEpisodes: MatchedEpisode[] = episodes.map((episode, episodeIndex) => {
    const indices = [...(episodeAlertIndices[episodeIndex] as number[])].sort(
      (a, b) => (alertTimes[a] as number) - (alertTimes[b] as number) || a - b,
    )
    const earliest = indices[0]
    const leadMinutes =
      earliest === undefined
        ? null
        : ((onsetTimes[episodeIndex] as number) - (alertTimes[earliest] as number)) / MS_PER_MINUTE
    return {
      id: episode.id,
      alertIds: indices.map((index) => (alerts[index] as DiaryAlert).id),
      warned: earliest !== undefined,
      leadMinutes,
    }
  })

  return { alerts: matchedAlerts, episodes: matchedEpisodes, totals: diaryTotals(matchedAlerts, matchedEpisodes) }
}

/**
 * The totals of matched alerts and episodes (any subset of one matchAlerts result, e.g. a recent period: an
 * alert keeps its truth and an episode its lead from the whole diary's matching).
 */
export function diaryTotals(alerts: readonly MatchedAlert[], episodes: readonly MatchedEpisode[]): DiaryMatch['totals'] {
  const trueAlerts = alerts.filter((alert) => alert.isTrue).length
  const warnedEpisodes = episodes.filter((episode) => episode.warned).length
  const leads = episodes.flatMap((episode) => (episode.leadMinutes === null ? [] : [episode.leadMinutes]))
  const leadMedian = quantile(leads, 0.5)
  return {
    alerts: alerts.length,
    episodes: episodes.length,
    trueAlerts,
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
