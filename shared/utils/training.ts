// Programme milestones and their readiness criteria: the default programme, and the pure check of whether a dog's
// recent, measured trials meet a milestone's criteria (with what is still needed). No database, no HTTP.
import { countOf } from './format'
import { scoreTrials, type ProportionInterval, type Trial, type TrialScore } from './stats'

export const SESSION_RUNNERS = ['trainer', 'handler'] as const
export type SessionRunner = (typeof SESSION_RUNNERS)[number]

/** Measured criteria a milestone may carry. Shares are whole percent (0..100). */
export interface ReadinessCriteria {
  /** Only trials in sessions of the last `windowDays` days count (a rolling window). */
  windowDays: number
  minTrials: number
  minSessions: number
  minDays: number
  /** At least this share of the counted trials ran blind (the person handling the dog did not know where the target was). */
  minBlindPercent: number
  /** The lower Wilson bound of sensitivity / specificity must be at or above these. */
  minSensitivityLowerPercent: number
  minSpecificityLowerPercent: number
}

export const CRITERIA_KEYS = ['windowDays', 'minTrials', 'minSessions', 'minDays', 'minBlindPercent', 'minSensitivityLowerPercent', 'minSpecificityLowerPercent'] as const

export interface MilestoneTemplateItem {
  name: string
  handlerText: string
  /** Whether the milestone is reached on measured trials (it then uses the business's default criteria). */
  measured: boolean
}

/**
 * The default programme (common practice: the usual stages of a scent-alert programme). Each text is what the
 * handler reads; the dog's reliability stages are measured.
 */
export const DEFAULT_PROGRAMME: { name: string, milestones: MilestoneTemplateItem[] } = {
  name: 'Standard scent-alert programme',
  milestones: [
    { name: 'Intake and suitability', measured: false, handlerText: 'Your trainer has met you and your dog and judged the dog suited to scent work: health, temperament and motivation.' },
    { name: 'Sample bank ready', measured: false, handlerText: 'There are enough target and control samples in the freezer, collected to the protocol, to start scent training.' },
    { name: 'Imprinting', measured: false, handlerText: 'Your dog has learned that the target scent pays: it goes straight to it when it is offered alone.' },
    { name: 'Discrimination', measured: true, handlerText: 'Your dog picks the target sample out of a line-up of controls and ignores line-ups with no target.' },
    { name: 'Trained alert behaviour', measured: true, handlerText: 'Your dog gives its trained alert (the agreed nudge, paw or sit) clearly on the target, and not otherwise.' },
    { name: 'Generalisation to new places and distractions', measured: true, handlerText: 'Your dog finds the target just as reliably in new places, with people, noise and food around.' },
    { name: 'Real-life alerts', measured: false, handlerText: 'Your dog alerts to real episodes at home, and you log them in the diary so the trainer can check the timing.' },
    { name: 'Public access readiness', measured: false, handlerText: 'Your dog is calm, clean and under control in public places, as local law on assistance dogs expects.' },
    { name: 'Placement', measured: false, handlerText: 'Your dog is placed with you as your working alert dog.' },
    { name: 'Aftercare and yearly re-check', measured: false, handlerText: 'Your trainer checks in regularly and re-tests the dog\'s reliability once a year.' },
  ],
}

// The business's default criteria (settings-training.ts): each figure is common practice for a trainer's sign-off,
// not a clinical standard. With 95% Wilson bounds, 30 target trials all hits give a lower bound of about 88.6%.
export const DEFAULT_CRITERIA: ReadinessCriteria = {
  windowDays: 60, // common practice: the dog as it is now, roughly the last two months
  minTrials: 40, // common practice
  minSessions: 6, // common practice
  minDays: 4, // common practice: not all on one good day
  minBlindPercent: 50, // common practice: at least half blind, so the handler cannot cue the dog
  minSensitivityLowerPercent: 80, // common practice
  minSpecificityLowerPercent: 80, // common practice
}

/** Criteria a trainer sets for a client may only be as strict or stricter than the business's defaults. */
export function loosenedCriteria(defaults: ReadinessCriteria, proposed: ReadinessCriteria): (keyof ReadinessCriteria)[] {
  const loose: (keyof ReadinessCriteria)[] = []
  if (proposed.windowDays > defaults.windowDays) loose.push('windowDays')
  for (const key of CRITERIA_KEYS) {
    if (key !== 'windowDays' && proposed[key] < defaults[key]) loose.push(key)
  }
  return loose
}

export interface SessionForReadiness {
  day: string // YYYY-MM-DD
  blind: boolean
  trials: Trial[]
  /** When the session was logged; needed only when readiness counts from a previous sign-off. */
  createdAt?: Date
}

/** The sign-off of the milestone before: trials logged before it were evidence for that milestone, not this one. */
export interface CountFrom {
  /** The sign-off's moment, and its day in the business's time zone. */
  at: Date
  day: string
}

export interface CriterionResult {
  key: 'trials' | 'sessions' | 'days' | 'blind' | 'sensitivity' | 'specificity'
  label: string
  met: boolean
  /** The figure behind it, in words. */
  actual: string
  /** What is still needed, in words; null when met. */
  stillNeeded: string | null
}

export interface Readiness {
  from: string
  /** Set when the window was cut short by the previous milestone's sign-off. */
  countedFromSignOff: boolean
  to: string
  criteria: CriterionResult[]
  allMet: boolean
  score: TrialScore
  blindTrials: number
}

const DAY_MS = 86_400_000
const pct = (x: number) => `${Math.round(x * 1000) / 10}%`

/** The first day (YYYY-MM-DD) of a rolling window of `days` days ending on `today` (inclusive). */
export function windowStart(today: string, days: number): string {
  return new Date(Date.parse(`${today}T00:00:00Z`) - (days - 1) * DAY_MS).toISOString().slice(0, 10)
}

function boundCriterion(key: 'sensitivity' | 'specificity', interval: ProportionInterval | null, minPercent: number, label: string, denominatorNoun: string): CriterionResult {
  const threshold = minPercent / 100
  if (!interval) {
    return { key, label, met: minPercent <= 0, actual: `No ${denominatorNoun} yet`, stillNeeded: minPercent <= 0 ? null : `Run ${denominatorNoun} to measure it` }
  }
  // Small tolerance so 80.0% shown is not refused for 0.7999999999.
  const met = interval.lower >= threshold - 1e-9
  return {
    key, label, met,
    actual: `${pct(interval.estimate)} (95% range ${pct(interval.lower)}–${pct(interval.upper)})`,
    stillNeeded: met ? null : `Lower end ${pct(interval.lower)} must reach ${minPercent}%: more ${denominatorNoun} with correct responses`,
  }
}

/**
 * Evaluates a milestone's criteria over the sessions of the rolling window ending on `today` (sessions outside
 * the window are ignored). Sensitivity and specificity follow scoreTrials (shared/utils/stats.ts); "blind" counts
 * the trials of sessions run blind.
 */
export function evaluateReadiness(criteria: ReadinessCriteria, sessions: readonly SessionForReadiness[], today: string, confidence = 0.95, countFrom: CountFrom | null = null): Readiness {
  const windowFrom = windowStart(today, criteria.windowDays)
  // Each milestone is earned on its own evidence: after a sign-off, the next milestone counts only the sessions logged
  // after it (common practice: a new stage is judged on the trials run at that stage).
  const countedFromSignOff = countFrom !== null && countFrom.day >= windowFrom
  const from = countedFromSignOff ? countFrom!.day : windowFrom
  const inWindow = sessions.filter(s => s.day >= from && s.day <= today
    && (!countFrom || (s.day >= countFrom.day && (!s.createdAt || s.createdAt.getTime() > countFrom.at.getTime()))))
  const trials = inWindow.flatMap(s => s.trials)
  const withTrials = inWindow.filter(s => s.trials.length > 0)
  const days = new Set(withTrials.map(s => s.day)).size
  const blindTrials = inWindow.filter(s => s.blind).reduce((n, s) => n + s.trials.length, 0)
  const score = scoreTrials(trials, confidence)
  const n = trials.length

  const results: CriterionResult[] = []
  results.push({
    key: 'trials', label: `At least ${countOf(criteria.minTrials, 'trial')}`, met: n >= criteria.minTrials,
    actual: countOf(n, 'trial'), stillNeeded: n >= criteria.minTrials ? null : `${countOf(criteria.minTrials - n, 'more trial')}`,
  })
  results.push({
    key: 'sessions', label: `Over at least ${countOf(criteria.minSessions, 'session')}`, met: withTrials.length >= criteria.minSessions,
    actual: countOf(withTrials.length, 'session'), stillNeeded: withTrials.length >= criteria.minSessions ? null : `${countOf(criteria.minSessions - withTrials.length, 'more session')}`,
  })
  results.push({
    key: 'days', label: `On at least ${countOf(criteria.minDays, 'different day')}`, met: days >= criteria.minDays,
    actual: countOf(days, 'day'), stillNeeded: days >= criteria.minDays ? null : `Sessions on ${countOf(criteria.minDays - days, 'more day')}`,
  })
  // Blind trials needed so that blind / max(n, minTrials) reaches the share.
  const blindTarget = Math.ceil((criteria.minBlindPercent / 100) * Math.max(n, criteria.minTrials) - 1e-9)
  const blindMet = n > 0 ? blindTrials >= blindTarget : criteria.minBlindPercent <= 0
  results.push({
    key: 'blind', label: `At least ${criteria.minBlindPercent}% of them blind`, met: blindMet,
    actual: n ? `${countOf(blindTrials, 'blind trial')} of ${n} (${pct(blindTrials / n)})` : 'No trials yet',
    stillNeeded: blindMet ? null : `${countOf(Math.max(1, blindTarget - blindTrials), 'more blind trial')}`,
  })
  results.push(boundCriterion('sensitivity', score.sensitivity, criteria.minSensitivityLowerPercent, `Finds the target: lower bound at least ${criteria.minSensitivityLowerPercent}%`, 'trials with a target'))
  results.push(boundCriterion('specificity', score.specificity, criteria.minSpecificityLowerPercent, `Stays quiet on blanks: lower bound at least ${criteria.minSpecificityLowerPercent}%`, 'blank trials'))
  return { from, countedFromSignOff, to: today, criteria: results, allMet: results.every(r => r.met), score, blindTrials }
}

/** Plain words for a proportion and its interval, for handlers and printed reports. */
export function intervalInWords(interval: ProportionInterval | null, what: string): string {
  if (!interval) return `Not measured yet: no ${what}.`
  return `${pct(interval.estimate)} — with the trials so far, the true figure most likely lies between ${pct(interval.lower)} and ${pct(interval.upper)}.`
}


// ---------------------------------------------------------------------------------------------------------------
// Adjusting a client's programme: where milestones go when one is added, removed or the order changes. Signed-off
// milestones stay first and in place (sign-off runs in order), and positions stay 0..n-1 without gaps.

export const MAX_MILESTONES = 30 // our own limit, the same as a template's

export interface ProgrammeSlot { id: string, position: number, confirmed: boolean }

export type ArrangeResult =
  | { ok: true, order: string[] }
  | { ok: false, status: 409 | 422, message: string, field?: string }

const byPosition = (slots: readonly ProgrammeSlot[]) => [...slots].sort((a, b) => a.position - b.position)
const confirmedFirst = (slots: readonly ProgrammeSlot[]) => byPosition(slots).filter(s => s.confirmed)

/** Where a new milestone may go: at `position` (0-based), never before a signed-off one. `newId` names it in the order. */
export function arrangeInsert(slots: readonly ProgrammeSlot[], position: number, newId: string): ArrangeResult {
  const ordered = byPosition(slots)
  const signed = confirmedFirst(slots).length
  if (ordered.length >= MAX_MILESTONES) return { ok: false, status: 422, message: `A programme has at most ${MAX_MILESTONES} milestones. Remove one first.` }
  if (!Number.isInteger(position) || position < signed || position > ordered.length) {
    return {
      ok: false, status: 422, field: 'position',
      message: signed
        ? `Signed-off milestones stay first: put the new one at place ${signed + 1} to ${ordered.length + 1}.`
        : `Put the new milestone at place 1 to ${ordered.length + 1}.`,
    }
  }
  const order = ordered.map(s => s.id)
  order.splice(position, 0, newId)
  return { ok: true, order }
}

/** The order after removing a milestone; a signed-off one, or the programme's only one, stays. */
export function arrangeRemoval(slots: readonly ProgrammeSlot[], id: string): ArrangeResult {
  const target = slots.find(s => s.id === id)
  if (!target) return { ok: false, status: 422, message: 'That milestone is not in this programme.' }
  if (target.confirmed) return { ok: false, status: 409, message: 'This milestone was signed off: it stays in the record and cannot be removed.' }
  if (slots.length === 1) return { ok: false, status: 422, message: 'A programme keeps at least one milestone. Add another before removing this one.' }
  return { ok: true, order: byPosition(slots).filter(s => s.id !== id).map(s => s.id) }
}

/**
 * The order after the trainer reorders the milestones not yet signed off. `unsignedIds` lists every one of them, each
 * once, in the new order; the signed-off ones keep their places at the front.
 */
export function arrangeReorder(slots: readonly ProgrammeSlot[], unsignedIds: readonly string[]): ArrangeResult {
  const open = byPosition(slots).filter(s => !s.confirmed).map(s => s.id)
  const given = new Set(unsignedIds)
  if (given.size !== unsignedIds.length) return { ok: false, status: 422, field: 'ids', message: 'Each milestone may appear only once in the new order.' }
  const signedGiven = unsignedIds.filter(id => slots.some(s => s.id === id && s.confirmed))
  if (signedGiven.length) return { ok: false, status: 409, field: 'ids', message: 'Signed-off milestones stay first and in place: reorder only the ones still to come.' }
  if (given.size !== open.length || open.some(id => !given.has(id))) {
    return { ok: false, status: 409, field: 'ids', message: 'The programme changed meanwhile (a milestone was added, removed or signed off). Reload it and reorder again.' }
  }
  return { ok: true, order: [...confirmedFirst(slots).map(s => s.id), ...unsignedIds] }
}

/** Rows whose position changes when `order` is applied: [id, new position]. */
export function positionChanges(slots: readonly ProgrammeSlot[], order: readonly string[]): [string, number][] {
  const now = new Map(slots.map(s => [s.id, s.position]))
  return order.map((id, i) => [id, i] as [string, number]).filter(([id, i]) => now.get(id) !== i)
}

// ---------------------------------------------------------------------------------------------------------------
// Readiness in a few words (the roster column)

export type ReadinessState = 'ready' | 'not yet' | 'unmeasured'

/** Ready, not yet (with the first thing still needed, e.g. "8 more blind trials"), or unmeasured (no measured criteria). */
export function readinessSummary(readiness: Readiness | null): { state: ReadinessState, stillNeeded: string | null, unmet: number } {
  if (!readiness) return { state: 'unmeasured', stillNeeded: null, unmet: 0 }
  const unmet = readiness.criteria.filter(c => !c.met)
  return { state: unmet.length ? 'not yet' : 'ready', stillNeeded: unmet[0]?.stillNeeded ?? null, unmet: unmet.length }
}

// ---------------------------------------------------------------------------------------------------------------
// A dog's reliability over all its sessions: overall, blind against not blind, and per stage.

export interface SessionForReliability { day: string, blind: boolean, stage: string, trials: Trial[] }

export interface DogReliability {
  overall: TrialScore
  blind: TrialScore
  notBlind: TrialScore
  /** Stages in the order given (first seen first when not given), only those with sessions. */
  byStage: { stage: string, sessions: number, score: TrialScore }[]
  sessions: number
  firstDay: string | null
  lastDay: string | null
}

export function dogReliability(sessions: readonly SessionForReliability[], stageOrder: readonly string[] = [], confidence = 0.95): DogReliability {
  const all = sessions.flatMap(s => s.trials)
  const stages = new Map<string, SessionForReliability[]>()
  for (const s of sessions) stages.set(s.stage, [...(stages.get(s.stage) ?? []), s])
  const rank = (stage: string) => { const i = stageOrder.indexOf(stage); return i < 0 ? stageOrder.length : i }
  const days = sessions.map(s => s.day).sort()
  return {
    overall: scoreTrials(all, confidence),
    blind: scoreTrials(sessions.filter(s => s.blind).flatMap(s => s.trials), confidence),
    notBlind: scoreTrials(sessions.filter(s => !s.blind).flatMap(s => s.trials), confidence),
    byStage: [...stages.entries()].sort(([a], [b]) => rank(a) - rank(b))
      .map(([stage, list]) => ({ stage, sessions: list.length, score: scoreTrials(list.flatMap(s => s.trials), confidence) })),
    sessions: sessions.length,
    firstDay: days[0] ?? null,
    lastDay: days.at(-1) ?? null,
  }
}
