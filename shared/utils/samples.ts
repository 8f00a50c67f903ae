// Scent-sample bank rules: collecting, storing, using and restocking target and control samples.
//
// A sample is a cotton roll soaked in the person's saliva, collected at the onset of a medical episode (a target)
// or when they are well (a control), bagged, frozen, and thawed briefly for a training session. Saliva samples are
// biological material: collect, store and throw them away hygienically, and keep them apart from food.
//
// Pure logic only: no database, no HTTP, no Nuxt. Every figure in DEFAULT_SAMPLE_POLICY is marked with its source.
//
// Time: all durations are measured in elapsed milliseconds between instants (a "day" is 24 hours, a "minute" 60
// seconds), so results never depend on the server's time zone or on daylight-saving changes.

import { countOf } from './format'
export const SAMPLE_KINDS = ['target', 'control'] as const
export type SampleKind = (typeof SAMPLE_KINDS)[number]

export const SAMPLE_KIND_LABELS: Record<SampleKind, string> = { target: 'target', control: 'control' }

export interface SamplePolicy {
  /** No food, drink other than water, tooth brushing, chewing gum, alcohol or smoking this long before collecting. */
  fastingMinutes: number
  /** No water either this long before collecting. */
  waterFreeMinutes: number
  /** Hands washed with unscented soap before handling the rolls. */
  unscentedSoapRequired: boolean
  /** Most cotton rolls in one small bag. */
  maxRollsPerBag: number
  /** Most small bags in one outer bag. */
  maxBagsPerOuterBag: number
  /** Older than this many days: flag for maintenance-only work and collect fresh samples. */
  renewAfterDays: number
  /** Older than this many days: do not use at all. */
  expireAfterDays: number
  /** Most times one sample may be taken out and used. */
  maxUsesPerSample: number
  /** Longest a sample should be out of the freezer for one use. */
  maxMinutesOutPerUse: number
  /** In imprinting a sample is used once and then thrown away. */
  imprintingSingleUse: boolean
  /** Restock when the forecast says the bank runs out within this many days. */
  restockThresholdDays: number
  /** Recent rate of use is measured over this many days before now. */
  forecastWindowDays: number
  /** A bank younger than the window is measured over its own age, but over at least this many days. */
  forecastMinDays: number
  /** A use longer than maxMinutesOutPerUse (the sample thawed) is its last: the sample is thrown away after it. */
  overLimitIsLastUse: boolean
  /** A target collected more than this many minutes after the first symptoms is flagged (late in the episode). */
  targetMaxMinutesAfterSymptoms: number
  /** A target collected after medication for the episode was taken is flagged. */
  flagMedicatedTargets: boolean
}

export const DEFAULT_SAMPLE_POLICY: SamplePolicy = Object.freeze({
  fastingMinutes: 45, // common practice
  waterFreeMinutes: 15, // common practice
  unscentedSoapRequired: true, // common practice
  maxRollsPerBag: 6, // common practice
  maxBagsPerOuterBag: 5, // common practice
  renewAfterDays: 183, // common practice (about 6 months)
  expireAfterDays: 365, // common practice (12 months)
  maxUsesPerSample: 3, // common practice
  maxMinutesOutPerUse: 5, // common practice
  imprintingSingleUse: true, // common practice
  restockThresholdDays: 21, // common practice
  // Our own choice: four weeks covers every weekday several times, so a quiet week or a busy weekend does not swing
  // the forecast, yet a change of training stage shows within a month.
  forecastWindowDays: 28,
  // Our own choice: a bank only days old is measured over its own age (its first week of imprinting is the rate it
  // runs at), but over at least a week, so one busy first afternoon does not read as the lasting rate.
  forecastMinDays: 7,
  overLimitIsLastUse: true, // common practice: a sample out longer than the limit has thawed; it is not refrozen
  // Common practice: the scent change is strongest early in an episode; a target collected more than an hour after
  // the first symptoms, or after medication for the episode, may smell of the episode's later stages or the drug.
  targetMaxMinutesAfterSymptoms: 60,
  flagMedicatedTargets: true,
})

/** A closed use longer than this is a typing mistake, not a thaw: refused as input error. Our own choice (24 h). */
export const MAX_PLAUSIBLE_USE_MINUTES = 24 * 60

/** The training stage name whose uses discard the sample when policy.imprintingSingleUse is on. */
export const IMPRINTING_STAGE = 'imprinting'

const MINUTE_MS = 60_000
const DAY_MS = 24 * 60 * MINUTE_MS

export interface Problem {
  /** Stable code for programs and tests. */
  rule: string
  /** Plain words a handler understands, with the figure. */
  message: string
}

// ---------------------------------------------------------------------------------------------------------------
// Collection

/** The things a person may have done before collecting, each of which can taint the sample. */
export const EXPOSURES = [
  'lastAteAt',
  'lastDrankOtherThanWaterAt',
  'lastBrushedTeethAt',
  'lastChewingGumAt',
  'lastAlcoholAt',
  'lastSmokedAt',
  'lastWaterAt',
] as const
export type Exposure = (typeof EXPOSURES)[number]

/**
 * A handler's answers to the collection questions.
 *
 * For each `last…At` question:
 * - a Date: when it last happened before collecting;
 * - `null`: it did not happen in the relevant time (or not at all);
 * - "don't know": list the question in `unknown`. A question left out (undefined) also counts as "don't know":
 *   an unanswered question never passes silently. "Don't know" compromises the sample, because nobody can say the
 *   protocol was kept.
 */
export interface CollectionAnswers {
  kind: SampleKind
  collectedAt: Date
  /** Targets only: when the first symptoms of the episode were noticed. */
  firstSymptomsAt?: Date | null
  lastAteAt?: Date | null
  lastDrankOtherThanWaterAt?: Date | null
  lastBrushedTeethAt?: Date | null
  lastChewingGumAt?: Date | null
  lastAlcoholAt?: Date | null
  lastSmokedAt?: Date | null
  lastWaterAt?: Date | null
  /** Questions the person could not answer. */
  unknown?: readonly Exposure[]
  washedHandsUnscented: boolean
  rolls: number
}

interface ExposureRule {
  rule: string
  what: string
  limit: (policy: SamplePolicy) => number
}

const EXPOSURE_RULES: Record<Exposure, ExposureRule> = {
  lastAteAt: { rule: 'fasting-food', what: 'eating', limit: (p) => p.fastingMinutes },
  lastDrankOtherThanWaterAt: {
    rule: 'fasting-drink',
    what: 'drinking anything other than water',
    limit: (p) => p.fastingMinutes,
  },
  lastBrushedTeethAt: { rule: 'fasting-teeth', what: 'brushing teeth', limit: (p) => p.fastingMinutes },
  lastChewingGumAt: { rule: 'fasting-gum', what: 'chewing gum', limit: (p) => p.fastingMinutes },
  lastAlcoholAt: { rule: 'fasting-alcohol', what: 'drinking alcohol', limit: (p) => p.fastingMinutes },
  lastSmokedAt: { rule: 'fasting-smoking', what: 'smoking', limit: (p) => p.fastingMinutes },
  lastWaterAt: { rule: 'water-free', what: 'drinking water', limit: (p) => p.waterFreeMinutes },
}

export interface CollectionCheck {
  /** True when the collection can be saved and is not compromised. */
  ok: boolean
  /** True when the answers can be saved (no input errors). The sample may still be compromised. */
  valid: boolean
  /** True when a protocol rule was broken: save the sample, marked compromised. */
  compromised: boolean
  /** Protocol rules broken (fasting, water, soap): the sample is compromised. */
  compromising: Problem[]
  /** Input errors: refuse the answers and ask again. */
  invalid: Problem[]
  /** invalid then compromising, for showing in one list. */
  broken: Problem[]
}

function isValidDate(d: unknown): d is Date {
  return d instanceof Date && !Number.isNaN(d.getTime())
}

function minutesText(ms: number): string {
  return countOf(Math.floor(ms / MINUTE_MS), 'minute')
}

/**
 * Check a handler's collection answers against the protocol.
 * A gap of exactly the policy's minutes is enough (45 minutes after eating is fine; 44 minutes 59 seconds is not).
 */
export function checkCollection(
  answers: CollectionAnswers,
  policy: SamplePolicy = DEFAULT_SAMPLE_POLICY,
  now: Date = new Date(),
): CollectionCheck {
  const invalid: Problem[] = []
  const compromising: Problem[] = []
  const collectedAt = answers.collectedAt
  const collectedOk = isValidDate(collectedAt)

  if (!collectedOk) {
    invalid.push({ rule: 'collected-at-invalid', message: 'Enter the date and time the sample was collected.' })
  } else if (collectedAt.getTime() > now.getTime()) {
    invalid.push({
      rule: 'collected-in-future',
      message: 'The collection time is in the future. Enter when the sample was actually collected.',
    })
  }

  // Rolls
  if (!Number.isInteger(answers.rolls)) {
    invalid.push({ rule: 'rolls-not-whole', message: 'Enter the number of cotton rolls as a whole number.' })
  } else if (answers.rolls < 1) {
    invalid.push({ rule: 'rolls-below-one', message: 'A sample needs at least 1 cotton roll.' })
  } else if (answers.rolls > policy.maxRollsPerBag) {
    invalid.push({
      rule: 'rolls-over-limit',
      message: `Put at most ${countOf(policy.maxRollsPerBag, 'cotton roll')} in one bag; you entered ${answers.rolls}. Use another bag for the rest.`,
    })
  }

  // First symptoms
  const first = answers.firstSymptomsAt
  if (answers.kind === 'target') {
    if (first === null || first === undefined) {
      invalid.push({
        rule: 'target-needs-first-symptoms',
        message: 'For a target sample, enter when you first noticed symptoms.',
      })
    } else if (!isValidDate(first)) {
      invalid.push({ rule: 'first-symptoms-invalid', message: 'Enter a valid date and time for the first symptoms.' })
    } else if (collectedOk && first.getTime() > collectedAt.getTime()) {
      invalid.push({
        rule: 'first-symptoms-after-collection',
        message: 'The first symptoms are after the collection time. Symptoms come first, then the sample.',
      })
    }
  } else if (first !== null && first !== undefined) {
    invalid.push({
      rule: 'control-has-first-symptoms',
      message: 'A control sample is collected when you are well. Leave the first-symptoms time empty, or save it as a target sample.',
    })
  }

  // Fasting and water
  const unknown = new Set<Exposure>(answers.unknown ?? [])
  for (const key of EXPOSURES) {
    const spec = EXPOSURE_RULES[key]
    const limit = spec.limit(policy)
    const value = answers[key]
    if (unknown.has(key) || value === undefined) {
      const lead = unknown.has(key)
        ? `You weren't sure when you last finished ${spec.what}`
        : `There is no answer for when you last finished ${spec.what}`
      compromising.push({
        rule: spec.rule,
        message: `${lead}, so the sample can't be trusted. Leave at least ${countOf(limit, 'minute')} after ${spec.what} before collecting.`,
      })
      continue
    }
    if (value === null) continue
    if (!isValidDate(value)) {
      invalid.push({ rule: 'exposure-invalid', message: `Enter a valid time for when you last finished ${spec.what}.` })
      continue
    }
    if (!collectedOk) continue
    const gap = collectedAt.getTime() - value.getTime()
    if (gap < 0) {
      invalid.push({
        rule: 'exposure-after-collection',
        message: `The time you last finished ${spec.what} is after the collection. Enter the last time before collecting.`,
      })
    } else if (gap < limit * MINUTE_MS) {
      compromising.push({
        rule: spec.rule,
        message: `Only ${minutesText(gap)} passed between ${spec.what} and collecting; at least ${countOf(limit, 'minute')} are needed.`,
      })
    }
  }

  if (policy.unscentedSoapRequired && answers.washedHandsUnscented !== true) {
    compromising.push({
      rule: 'unscented-soap',
      message: 'Hands must be washed with unscented soap before touching the cotton rolls.',
    })
  }

  return {
    ok: invalid.length === 0 && compromising.length === 0,
    valid: invalid.length === 0,
    compromised: compromising.length > 0,
    compromising,
    invalid,
    broken: [...invalid, ...compromising],
  }
}

/** One exposure still too recent to collect a control sample now. */
export interface WaitReason {
  rule: string
  /** "eating", "drinking water"… */
  what: string
  /** When collecting is clear of it. */
  clearAt: Date
}

export interface CollectionWait {
  /** Whole minutes still to wait (rounded up); 0 when collecting now keeps every limit. */
  minutes: number
  /** When collecting keeps every limit (now when there is nothing to wait for). */
  readyAt: Date
  /** The exposures still too recent, the one clear last first. */
  reasons: WaitReason[]
}

/**
 * How long to wait before collecting, from the checklist answered first (before any roll goes in the mouth).
 *
 * Control samples: each exposure is clear `limit` minutes after it last happened (policy.fastingMinutes,
 * policy.waterFreeMinutes, the same limits checkCollection applies); an exposure the person is not sure about
 * counts as just now (`answeredAt`), so waiting its whole limit makes it certain. Eaten 20 minutes ago with a
 * 45-minute limit: wait 25 more minutes.
 * Target samples never wait: the episode will not, and collecting early matters most (a late or medicated target is
 * flagged as before, by targetTiming).
 */
export function collectionWait(
  input: { kind: SampleKind, answeredAt: Date, exposures: Partial<Record<Exposure, Date | null>>, unknown?: readonly Exposure[] },
  policy: SamplePolicy = DEFAULT_SAMPLE_POLICY,
  now: Date = input.answeredAt,
): CollectionWait {
  const t = now.getTime()
  if (input.kind === 'target') return { minutes: 0, readyAt: new Date(t), reasons: [] }
  const unknown = new Set(input.unknown ?? [])
  const reasons: WaitReason[] = []
  for (const key of EXPOSURES) {
    const spec = EXPOSURE_RULES[key]
    const value = input.exposures[key]
    const last = unknown.has(key) ? input.answeredAt : isValidDate(value) ? value : null
    if (!last) continue
    const clearAt = last.getTime() + spec.limit(policy) * MINUTE_MS
    if (clearAt > t) reasons.push({ rule: spec.rule, what: spec.what, clearAt: new Date(clearAt) })
  }
  reasons.sort((a, b) => b.clearAt.getTime() - a.clearAt.getTime())
  const readyAt = reasons[0]?.clearAt.getTime() ?? t
  return { minutes: Math.ceil((readyAt - t) / MINUTE_MS), readyAt: new Date(readyAt), reasons }
}

/** "Wait 25 more minutes" (null when there is nothing to wait for). */
export function waitText(wait: CollectionWait): string | null {
  if (wait.minutes <= 0) return null
  return `Wait ${countOf(wait.minutes, 'more minute', 'more minutes')}`
}


// ---------------------------------------------------------------------------------------------------------------
// Samples and uses

export interface Sample {
  id: string
  kind: SampleKind
  collectedAt: Date
  compromised: boolean
  /** A trainer's reason for using a compromised sample anyway. A blank reason is no override. */
  overrideReason?: string | null
  discardedAt?: Date | null
}

export interface SampleUse {
  sampleId: string
  outAt: Date
  /** null while the sample is still out of the freezer. */
  backAt: Date | null
  /** The sample was thrown away after this use. */
  discarded: boolean
  /** Training stage, e.g. 'imprinting'. */
  stage?: string | null
  /** The closed use was out longer than maxMinutesOutPerUse. */
  overLimit?: boolean
}

export type SampleStatus = 'usable' | 'maintenance-only' | 'expired' | 'used-up' | 'compromised' | 'discarded'

export interface SampleState {
  status: SampleStatus
  usesLeft: number
  /** Last instant the sample may be used (collectedAt + expireAfterDays). */
  expiresAt: string
  /** Last instant before the sample is for maintenance only (collectedAt + renewAfterDays). */
  renewAt: string
  /** The sample is out of the freezer now. */
  openUse: boolean
  /** It has been out longer than maxMinutesOutPerUse. */
  overdueUse: boolean
  /** Compromised at collection but a trainer gave a reason to use it. */
  overridden: boolean
}

export function isImprintingStage(stage: string | null | undefined): boolean {
  return typeof stage === 'string' && stage.trim().toLowerCase() === IMPRINTING_STAGE
}

/**
 * True when this use throws the sample away: marked discarded, an imprinting use under a single-use policy, or a
 * use out longer than the limit under the "last use" policy (the sample thawed).
 */
export function useDiscards(use: Pick<SampleUse, 'discarded' | 'stage' | 'overLimit'>, policy: SamplePolicy): boolean {
  return use.discarded || (policy.imprintingSingleUse && isImprintingStage(use.stage)) || (policy.overLimitIsLastUse && use.overLimit === true)
}

/** Why a use threw its sample away, in words for the sample's record (null when it did not). */
export function discardReasonOf(use: Pick<SampleUse, 'discarded' | 'stage' | 'overLimit'>, policy: SamplePolicy): string | null {
  if (use.discarded) return 'Thrown away after use.'
  if (policy.overLimitIsLastUse && use.overLimit === true) return `Out of the freezer longer than ${countOf(policy.maxMinutesOutPerUse, 'minute')}: that use was its last.`
  if (policy.imprintingSingleUse && isImprintingStage(use.stage)) return 'Single use in imprinting.'
  return null
}

function hasOverride(sample: Sample): boolean {
  return typeof sample.overrideReason === 'string' && sample.overrideReason.trim() !== ''
}

/**
 * Where a sample stands at `now`.
 *
 * Precedence, first match wins:
 *   discarded (thrown away, or a use discarded it, including any imprinting use under a single-use policy)
 *   > used-up (maxUsesPerSample uses recorded)
 *   > expired (more than expireAfterDays since collection)
 *   > compromised (protocol broken at collection and no override reason)
 *   > maintenance-only (more than renewAfterDays since collection)
 *   > usable.
 * Ages compare elapsed time: a sample is usable at exactly renewAfterDays and at exactly expireAfterDays after
 * collection, and not one millisecond later. Only `uses` with this sample's id are counted.
 */
export function sampleState(
  sample: Sample,
  uses: readonly SampleUse[],
  now: Date = new Date(),
  policy: SamplePolicy = DEFAULT_SAMPLE_POLICY,
): SampleState {
  const own = uses.filter((u) => u.sampleId === sample.id)
  const collected = sample.collectedAt.getTime()
  const expiresAtMs = collected + policy.expireAfterDays * DAY_MS
  const renewAtMs = collected + policy.renewAfterDays * DAY_MS
  const t = now.getTime()

  const discarded =
    (sample.discardedAt !== null && sample.discardedAt !== undefined && sample.discardedAt.getTime() <= t) ||
    own.some((u) => useDiscards(u, policy))
  const usesLeft = discarded ? 0 : Math.max(0, policy.maxUsesPerSample - own.length)
  const open = own.filter((u) => u.backAt === null)
  const overdueUse = open.some((u) => t - u.outAt.getTime() > policy.maxMinutesOutPerUse * MINUTE_MS)
  const overridden = sample.compromised && hasOverride(sample)

  let status: SampleStatus
  if (discarded) status = 'discarded'
  else if (usesLeft === 0) status = 'used-up'
  else if (t > expiresAtMs) status = 'expired'
  else if (sample.compromised && !overridden) status = 'compromised'
  else if (t > renewAtMs) status = 'maintenance-only'
  else status = 'usable'

  return {
    status,
    usesLeft,
    expiresAt: new Date(expiresAtMs).toISOString(),
    renewAt: new Date(renewAtMs).toISOString(),
    openUse: open.length > 0,
    overdueUse,
    overridden,
  }
}

export interface NewUse {
  outAt: Date
  backAt: Date | null
  stage?: string | null
  discarded?: boolean
}

export interface UseCheck {
  /** True when the use may be saved (nothing refused, no input error). */
  ok: boolean
  /** The sample may not be used this way. */
  refused: Problem[]
  /** Input errors in the times. */
  invalid: Problem[]
  /** Allowed, but worth telling the handler (e.g. out longer than the limit). */
  warnings: Problem[]
  /** The closed use was out longer than maxMinutesOutPerUse. */
  overLimit: boolean
  /** Saving this use throws the sample away (marked discarded, or imprinting under a single-use policy). */
  discards: boolean
}

const STATUS_REFUSALS: Record<Exclude<SampleStatus, 'usable' | 'maintenance-only'>, string> = {
  discarded: 'This sample has been thrown away and cannot be used.',
  'used-up': 'This sample has been used the most times allowed',
  expired: 'This sample is too old to use',
  compromised:
    'This sample was compromised at collection. A trainer can allow it by giving a reason; otherwise collect a new one.',
}

function closedUseProblems(
  outAt: Date,
  backAt: Date,
  now: Date,
  policy: SamplePolicy,
): { invalid: Problem[]; warnings: Problem[]; overLimit: boolean } {
  const invalid: Problem[] = []
  const warnings: Problem[] = []
  let overLimit = false
  if (!isValidDate(backAt)) {
    invalid.push({ rule: 'back-at-invalid', message: 'Enter a valid time the sample went back in the freezer.' })
    return { invalid, warnings, overLimit }
  }
  const out = backAt.getTime() - outAt.getTime()
  if (backAt.getTime() > now.getTime()) {
    invalid.push({ rule: 'back-in-future', message: 'The time the sample went back is in the future.' })
  }
  if (out <= 0) {
    invalid.push({
      rule: 'back-before-out',
      message: 'The time the sample went back must be after the time it came out.',
    })
  } else if (out > MAX_PLAUSIBLE_USE_MINUTES * MINUTE_MS) {
    invalid.push({
      rule: 'use-implausibly-long',
      message: `The sample would have been out for more than ${MAX_PLAUSIBLE_USE_MINUTES / 60} hours. Check the times.`,
    })
  } else if (out > policy.maxMinutesOutPerUse * MINUTE_MS) {
    overLimit = true
    warnings.push({
      rule: 'over-time-limit',
      message: policy.overLimitIsLastUse
        ? `The sample was out for ${minutesText(out)}, longer than ${countOf(policy.maxMinutesOutPerUse, 'minute')}: it has thawed, so this was its last use. Throw it away.`
        : `The sample was out for ${minutesText(out)}; keep it out no longer than ${countOf(policy.maxMinutesOutPerUse, 'minute')}.`,
    })
  }
  return { invalid, warnings, overLimit }
}

/**
 * Validate a new use of a sample before saving it.
 * The sample's state is taken at the moment it came out (`use.outAt`), counting the uses already recorded.
 * A maintenance-only sample may be used only when `maintenanceSession` is true.
 */
export function checkUse(input: {
  sample: Sample
  uses: readonly SampleUse[]
  use: NewUse
  maintenanceSession?: boolean
  now?: Date
  policy?: SamplePolicy
}): UseCheck {
  const policy = input.policy ?? DEFAULT_SAMPLE_POLICY
  const now = input.now ?? new Date()
  const { sample, use } = input
  const own = input.uses.filter((u) => u.sampleId === sample.id)
  const refused: Problem[] = []
  const invalid: Problem[] = []
  const warnings: Problem[] = []
  let overLimit = false

  if (!isValidDate(use.outAt)) {
    invalid.push({ rule: 'out-at-invalid', message: 'Enter a valid time the sample came out of the freezer.' })
    return { ok: false, refused, invalid, warnings, overLimit, discards: false }
  }
  if (use.outAt.getTime() > now.getTime()) {
    invalid.push({ rule: 'out-in-future', message: 'The time the sample came out is in the future.' })
  }
  if (use.outAt.getTime() < sample.collectedAt.getTime()) {
    invalid.push({ rule: 'out-before-collection', message: 'The sample cannot come out before it was collected.' })
  }
  if (use.backAt !== null) {
    const closed = closedUseProblems(use.outAt, use.backAt, now, policy)
    invalid.push(...closed.invalid)
    warnings.push(...closed.warnings)
    overLimit = closed.overLimit
  }

  const state = sampleState(sample, own, use.outAt, policy)
  if (state.status === 'maintenance-only') {
    if (input.maintenanceSession !== true) {
      refused.push({
        rule: 'maintenance-only',
        message: `This sample is more than ${countOf(policy.renewAfterDays, 'day')} old: use it only in a maintenance session, and collect fresh samples.`,
      })
    }
  } else if (state.status === 'used-up') {
    refused.push({ rule: 'used-up', message: `${STATUS_REFUSALS['used-up']} (${policy.maxUsesPerSample}).` })
  } else if (state.status === 'expired') {
    refused.push({
      rule: 'expired',
      message: `${STATUS_REFUSALS.expired}: samples last ${countOf(policy.expireAfterDays, 'day')}.`,
    })
  } else if (state.status !== 'usable') {
    refused.push({ rule: state.status, message: STATUS_REFUSALS[state.status] })
  }

  if (own.some((u) => u.backAt === null)) {
    refused.push({
      rule: 'another-use-open',
      message: 'This sample is already out. Record when it went back in the freezer first.',
    })
  }

  // A sample cannot be out twice at once.
  const newStart = use.outAt.getTime()
  const newEnd = use.backAt === null || !isValidDate(use.backAt) ? Number.POSITIVE_INFINITY : use.backAt.getTime()
  const overlaps = own.some((u) => {
    if (u.backAt === null) return false // reported above
    return u.outAt.getTime() < newEnd && newStart < u.backAt.getTime()
  })
  if (overlaps) {
    invalid.push({ rule: 'overlaps-other-use', message: 'These times overlap another use of the same sample.' })
  }

  return {
    ok: refused.length === 0 && invalid.length === 0,
    refused,
    invalid,
    warnings,
    overLimit,
    discards: useDiscards({ discarded: use.discarded ?? false, stage: use.stage ?? null, overLimit }, policy),
  }
}

/** Validate closing an open use: the time the sample went back in the freezer. */
export function checkUseReturn(
  use: Pick<SampleUse, 'outAt' | 'backAt'>,
  backAt: Date,
  now: Date = new Date(),
  policy: SamplePolicy = DEFAULT_SAMPLE_POLICY,
): { ok: boolean; invalid: Problem[]; warnings: Problem[]; overLimit: boolean } {
  if (use.backAt !== null) {
    return {
      ok: false,
      invalid: [{ rule: 'use-already-closed', message: 'This use is already closed: the sample is back in the freezer.' }],
      warnings: [],
      overLimit: false,
    }
  }
  const r = closedUseProblems(use.outAt, backAt, now, policy)
  return { ok: r.invalid.length === 0, ...r }
}

// ---------------------------------------------------------------------------------------------------------------
// Target timing: how far into the episode a target was collected, and whether medication came first.

export interface TargetTimingInput {
  kind: SampleKind
  collectedAt: Date
  firstSymptomsAt?: Date | null
  /** Medication for this episode taken before collecting; null or left out: not recorded. */
  medicationBefore?: boolean | null
}

export interface TargetTiming {
  /** Whole minutes from the first symptoms to collecting (rounded down); null for a control or without the time. */
  minutesAfterSymptoms: number | null
  /** Collected more than targetMaxMinutesAfterSymptoms after the first symptoms. */
  late: boolean
  /** Collected after medication for the episode (and the policy flags that). */
  medicated: boolean
  /** Late or medicated: the trainer may keep it out of training. */
  flagged: boolean
  reasons: Problem[]
}

/**
 * A target's timing flags. Late: collectedAt − firstSymptomsAt > targetMaxMinutesAfterSymptoms minutes (exactly the
 * limit is not late). Medicated: medicationBefore is true and policy.flagMedicatedTargets is on. A control is never
 * flagged; neither is a target whose medication was not recorded (it says so in the record, not as a flag).
 */
export function targetTiming(input: TargetTimingInput, policy: SamplePolicy = DEFAULT_SAMPLE_POLICY): TargetTiming {
  if (input.kind !== 'target') return { minutesAfterSymptoms: null, late: false, medicated: false, flagged: false, reasons: [] }
  const first = input.firstSymptomsAt
  const gap = first && isValidDate(first) && isValidDate(input.collectedAt) ? input.collectedAt.getTime() - first.getTime() : null
  const late = gap !== null && gap > policy.targetMaxMinutesAfterSymptoms * MINUTE_MS
  const medicated = policy.flagMedicatedTargets && input.medicationBefore === true
  const reasons: Problem[] = []
  if (late) {
    reasons.push({
      rule: 'target-late',
      message: `Collected ${minutesText(gap!)} after the first symptoms, later than the ${countOf(policy.targetMaxMinutesAfterSymptoms, 'minute')} the protocol allows.`,
    })
  }
  if (medicated) reasons.push({ rule: 'target-after-medication', message: 'Collected after medication for the episode was taken.' })
  return { minutesAfterSymptoms: gap === null ? null : Math.floor(Math.max(0, gap) / MINUTE_MS), late, medicated, flagged: late || medicated, reasons }
}

// ---------------------------------------------------------------------------------------------------------------
// A bag's state: the one answer every screen, list and the forecast use.

/** Facts about a bag beyond the sample itself. Left out, a bag counts as stored with its checklist answered. */
export interface BagFacts {
  /** In an outer bag in the freezer. */
  stored?: boolean
  /** Its collection checklist is answered (false for a quick save still waiting). */
  answersComplete?: boolean
  /** The trainer keeps it out of training (e.g. a late or medicated target filtered out; see targetTiming). */
  keptOut?: boolean
}
export type Bag = Sample & BagFacts

export type BagState =
  | 'ready' | 'maintenance-only' | 'out' | 'to-store' | 'awaiting-answers' | 'kept-out'
  | 'compromised' | 'expired' | 'used-up' | 'discarded'

/** Where a bag is listed for the household: to finish, ready for training, not for training, or gone. */
export type BagList = 'to-finish' | 'ready' | 'not-for-training' | 'gone'

export const BAG_LIST_OF: Record<BagState, BagList> = {
  out: 'to-finish', 'awaiting-answers': 'to-finish', 'to-store': 'to-finish',
  ready: 'ready', 'maintenance-only': 'ready',
  'kept-out': 'not-for-training', compromised: 'not-for-training', expired: 'not-for-training', 'used-up': 'not-for-training',
  discarded: 'gone',
}

export interface BagView extends SampleState {
  state: BagState
  list: BagList
  /** Counted in the forecast's uses left and bags: usable (not maintenance-only), answered, not kept out. */
  inStock: boolean
  /** Last day it may be used while it still may be (usable, maintenance-only, or waiting for answers); else null. */
  useUntil: string | null
}

/**
 * A bag's state at `now`. Precedence, first match wins:
 *   discarded > out (a use is open: it must go back or be thrown away, whatever else) > used-up > expired
 *   > awaiting-answers (quick save) > compromised (no override) > kept-out > to-store (not in an outer bag yet)
 *   > maintenance-only > ready.
 * inStock is true for a usable sample (see sampleState) that is answered and not kept out, whether it is ready, out
 * now or still to be put in the freezer: the forecast counts exactly these, and the household's card says how many
 * of them are in the freezer.
 */
export function bagState(bag: Bag, uses: readonly SampleUse[], now: Date = new Date(), policy: SamplePolicy = DEFAULT_SAMPLE_POLICY): BagView {
  const answered = bag.answersComplete !== false
  const sample: Sample = answered ? bag : { ...bag, compromised: true, overrideReason: null }
  const st = sampleState(sample, uses, now, policy)
  let state: BagState
  if (st.status === 'discarded') state = 'discarded'
  else if (st.openUse) state = 'out'
  else if (st.status === 'used-up' || st.status === 'expired') state = st.status
  else if (!answered) state = 'awaiting-answers'
  else if (st.status === 'compromised') state = 'compromised'
  else if (bag.keptOut === true) state = 'kept-out'
  else if (bag.stored === false) state = 'to-store'
  else state = st.status === 'maintenance-only' ? 'maintenance-only' : 'ready'
  const inStock = st.status === 'usable' && answered && bag.keptOut !== true
  const mayBeUsed = st.status === 'usable' || st.status === 'maintenance-only' || (!answered && st.status === 'compromised')
  return {
    ...st,
    // Uses the household can still put to training: none while it waits for answers, is kept out or is past use.
    usesLeft: (st.status === 'usable' || st.status === 'maintenance-only') && answered && bag.keptOut !== true ? st.usesLeft : 0,
    state,
    list: BAG_LIST_OF[state],
    inStock,
    useUntil: mayBeUsed && bag.keptOut !== true ? st.expiresAt : null,
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Packing: small bags of one kind go into an outer bag of the same kind, outer bags into a container of that kind.

export interface PackingInput {
  bagKind: SampleKind
  outerBagKind: SampleKind
  /** Small bags in the outer bag, counting this one. */
  outerBagCount: number
  /** Kind of the freezer container the outer bag goes in; null when not yet placed. */
  containerKind?: SampleKind | null
}

export function checkPacking(
  input: PackingInput,
  policy: SamplePolicy = DEFAULT_SAMPLE_POLICY,
): { ok: boolean; problems: Problem[] } {
  const problems: Problem[] = []
  if (input.bagKind !== input.outerBagKind) {
    problems.push({
      rule: 'bag-kind-mismatch',
      message: `Keep target and control samples apart: a ${input.bagKind} bag cannot go in a ${input.outerBagKind} outer bag.`,
    })
  }
  if (!Number.isInteger(input.outerBagCount) || input.outerBagCount < 1) {
    problems.push({
      rule: 'outer-bag-count-invalid',
      message: 'Enter how many small bags are in the outer bag as a whole number of at least 1.',
    })
  } else if (input.outerBagCount > policy.maxBagsPerOuterBag) {
    problems.push({
      rule: 'outer-bag-full',
      message: `Put at most ${countOf(policy.maxBagsPerOuterBag, 'small bag')} in one outer bag; this would make ${input.outerBagCount}. Start a new outer bag.`,
    })
  }
  const container = input.containerKind
  if (container !== null && container !== undefined && container !== input.outerBagKind) {
    problems.push({
      rule: 'container-kind-mismatch',
      message: `Keep target and control samples apart: a ${input.outerBagKind} outer bag cannot go in a ${container} container.`,
    })
  }
  return { ok: problems.length === 0, problems }
}

// ---------------------------------------------------------------------------------------------------------------
// Stock forecast

export interface KindForecast {
  /** Bags in stock (bagState's inStock): usable, answered, not kept out — ready, out now or still to store. */
  usableSamples: number
  /** Of those: in the freezer, out of it now, and waiting to go in. */
  bags: { ready: number, out: number, toStore: number }
  /** Samples with status 'maintenance-only' (not counted in usesLeft). */
  maintenanceOnlySamples: number
  /** Uses left across the usable samples. */
  usesLeft: number
  /** Uses consumed per day over rateDays (see stockForecast). */
  ratePerDay: number
  /** Days the rate is measured over: the bank's age, at least forecastMinDays and at most forecastWindowDays. */
  rateDays: number
  /** When the usable uses run out at that rate; now when none are left; null when nothing was used. */
  runsOutAt: string | null
  /** Whole days until runsOutAt (rounded down); 0 when none left; null when nothing was used. */
  daysLeft: number | null
  /** When the last usable sample turns maintenance-only by age, however little is used; null when none usable. */
  agesOutAt: string | null
  /** Restock: daysLeft ≤ restockThresholdDays, or no uses left, or the usable samples age out within that time. */
  restockDue: boolean
}

export type StockForecast = Record<SampleKind, KindForecast>

/**
 * Forecast when each kind of sample runs out.
 *
 * Rate: the uses consumed by uses that came out in the window (now − forecastWindowDays, now], divided by the days
 * measured: forecastWindowDays, or — for a bank whose first sample of this kind is younger than that — the bank's
 * own age, but never fewer than forecastMinDays. (Dividing a week-old bank's uses by the whole window told a
 * household burning samples in imprinting it had about four times longer than it had.) A use consumes 1; a use that
 * discards its sample (marked discarded, imprinting under a single-use policy, or over the time limit under the
 * last-use policy) consumes every use the sample had left before it, because that is what the bank loses.
 * Stock is what bagState counts as inStock. Uses of samples not in `samples`, and uses dated after now, are ignored.
 */
export function stockForecast(
  samples: readonly Bag[],
  uses: readonly SampleUse[],
  now: Date = new Date(),
  policy: SamplePolicy = DEFAULT_SAMPLE_POLICY,
): StockForecast {
  const t = now.getTime()
  const windowStart = t - policy.forecastWindowDays * DAY_MS
  const byId = new Map(samples.map((s) => [s.id, s]))
  const usesBySample = new Map<string, SampleUse[]>()
  for (const u of uses) {
    if (!byId.has(u.sampleId)) continue
    const list = usesBySample.get(u.sampleId) ?? []
    list.push(u)
    usesBySample.set(u.sampleId, list)
  }

  const forecastKind = (kind: SampleKind): KindForecast => {
    let usableSamples = 0
    let maintenanceOnlySamples = 0
    let usesLeft = 0
    let consumed = 0
    let agesOutMs: number | null = null
    let firstCollected = Number.POSITIVE_INFINITY
    const bags = { ready: 0, out: 0, toStore: 0 }

    for (const sample of samples) {
      if (sample.kind !== kind) continue
      firstCollected = Math.min(firstCollected, sample.collectedAt.getTime())
      const own = (usesBySample.get(sample.id) ?? []).slice().sort((a, b) => a.outAt.getTime() - b.outAt.getTime())
      const view = bagState(sample, own, now, policy)
      if (view.inStock) {
        usableSamples += 1
        usesLeft += view.usesLeft
        if (view.state === 'out') bags.out += 1
        else if (view.state === 'to-store') bags.toStore += 1
        else bags.ready += 1
        const renew = Date.parse(view.renewAt)
        agesOutMs = agesOutMs === null ? renew : Math.max(agesOutMs, renew)
      } else if (view.status === 'maintenance-only' && view.list !== 'not-for-training') {
        maintenanceOnlySamples += 1
      }
      own.forEach((u, usesBefore) => {
        const out = u.outAt.getTime()
        if (out <= windowStart || out > t) return
        consumed += useDiscards(u, policy) ? Math.max(1, policy.maxUsesPerSample - usesBefore) : 1
      })
    }

    // The span measured, in whole milliseconds: the bank's age, clamped to [forecastMinDays, forecastWindowDays].
    const age = Number.isFinite(firstCollected) ? Math.max(0, t - firstCollected) : policy.forecastWindowDays * DAY_MS
    const spanMs = Math.min(policy.forecastWindowDays * DAY_MS, Math.max(Math.min(policy.forecastMinDays, policy.forecastWindowDays) * DAY_MS, age))
    const ratePerDay = (consumed * DAY_MS) / spanMs
    let runsOutAt: string | null = null
    let daysLeft: number | null = null
    if (usesLeft === 0) {
      runsOutAt = now.toISOString()
      daysLeft = 0
    } else if (consumed > 0) {
      // usesLeft ÷ (consumed / span) = usesLeft × span ÷ consumed, in integers so 21.0 days is never 20.99….
      const leftMs = usesLeft * spanMs
      runsOutAt = new Date(t + Math.round(leftMs / consumed)).toISOString()
      daysLeft = Math.floor(leftMs / (consumed * DAY_MS))
    }
    const agesOutSoon = agesOutMs !== null && agesOutMs - t <= policy.restockThresholdDays * DAY_MS
    return {
      usableSamples,
      bags,
      maintenanceOnlySamples,
      usesLeft,
      ratePerDay,
      rateDays: spanMs / DAY_MS,
      runsOutAt,
      daysLeft,
      agesOutAt: agesOutMs === null ? null : new Date(agesOutMs).toISOString(),
      restockDue: usesLeft === 0 || (daysLeft !== null && daysLeft <= policy.restockThresholdDays) || agesOutSoon,
    }
  }
  return { target: forecastKind('target'), control: forecastKind('control') }
}

// ---------------------------------------------------------------------------------------------------------------
// Bag codes: short codes written on the bag in pencil. No 0/O, 1/I/L, which are easily misread by hand.

export const BAG_CODE_ALPHABET = 'ABCDEFGHJKMNPQRSTUVWXYZ23456789'
export const BAG_CODE_LENGTH = 4
export const BAG_CODE_PREFIX: Record<SampleKind, string> = { target: 'T', control: 'C' }

/** A source of random numbers in [0, 1), like Math.random. */
export type RandomSource = () => number

/** Cryptographically strong random numbers in [0, 1). */
export const cryptoRandom: RandomSource = () => {
  const buf = new Uint32Array(1)
  globalThis.crypto.getRandomValues(buf)
  return (buf[0] ?? 0) / 2 ** 32
}

/** A deterministic random source for tests and demo data (mulberry32). */
export function seededRandom(seed: number): RandomSource {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let x = a
    x = Math.imul(x ^ (x >>> 15), x | 1)
    x ^= x + Math.imul(x ^ (x >>> 7), x | 61)
    return ((x ^ (x >>> 14)) >>> 0) / 2 ** 32
  }
}

/** A new bag code such as 'T-7KQ3' (target) or 'C-H4XP' (control). */
export function bagCode(kind: SampleKind, random: RandomSource = cryptoRandom): string {
  let body = ''
  for (let i = 0; i < BAG_CODE_LENGTH; i++) {
    const r = random()
    if (!(r >= 0 && r < 1)) throw new RangeError('The random source must return numbers from 0 up to but not including 1.')
    body += BAG_CODE_ALPHABET[Math.floor(r * BAG_CODE_ALPHABET.length)]
  }
  return `${BAG_CODE_PREFIX[kind]}-${body}`
}

/** A bag code not in `taken`; throws after maxTries clashes (the bank is then implausibly full). */
export function uniqueBagCode(
  kind: SampleKind,
  taken: ReadonlySet<string>,
  random: RandomSource = cryptoRandom,
  maxTries = 100,
): string {
  for (let i = 0; i < maxTries; i++) {
    const code = bagCode(kind, random)
    if (!taken.has(code)) return code
  }
  throw new RangeError(`No free bag code found in ${maxTries} tries.`)
}

// Codes made on the server have BAG_CODE_LENGTH characters; codes made on a phone one more (shared/utils/bag-codes.ts),
// so the two can never be the same code.
const BAG_CODE_RE = new RegExp(`^([TC])-[${BAG_CODE_ALPHABET}]{${BAG_CODE_LENGTH},${BAG_CODE_LENGTH + 1}}$`)

/** True for a well-formed bag code (upper case, made on the server or on a phone), optionally of the given kind. */
export function isBagCode(value: string, kind?: SampleKind): boolean {
  const m = BAG_CODE_RE.exec(value)
  if (!m) return false
  return kind === undefined || m[1] === BAG_CODE_PREFIX[kind]
}

/** Tidy a code as typed back from the bag: trims, upper-cases, adds the hyphen if left out ('t7kq3' → 'T-7KQ3'). */
export function normaliseBagCode(input: string): string {
  const s = input.trim().toUpperCase().replace(/\s+/g, '')
  return /^[TC][^-]/.test(s) ? `${s[0]}-${s.slice(1)}` : s
}

/** The kind a bag code stands for, or null when it is not a bag code. */
export function bagCodeKind(value: string): SampleKind | null {
  if (!isBagCode(value)) return null
  return value.startsWith('T') ? 'target' : 'control'
}

// ---------------------------------------------------------------------------------------------------------------
// Bank summary and restocking episodes

export interface KindSummary {
  /** Samples by status ('usable', 'maintenance-only', …). */
  byStatus: Record<SampleStatus, number>
  /** Usable or maintenance-only samples whose expiry falls within restockThresholdDays of now. */
  expiringSoon: number
  /** Usable samples that turn maintenance-only within restockThresholdDays of now. */
  renewSoon: number
}

export interface BankSummary {
  target: KindSummary
  control: KindSummary
  /** Uses out of the freezer now, and those out longer than maxMinutesOutPerUse. */
  openUses: number
  overdueUses: number
}

const emptyByStatus = (): Record<SampleStatus, number> =>
  ({ usable: 0, 'maintenance-only': 0, expired: 0, 'used-up': 0, compromised: 0, discarded: 0 })

/** Counts a household's samples by kind and status, with what falls due within the restock threshold. */
export function bankSummary(
  samples: readonly Sample[],
  uses: readonly SampleUse[],
  now: Date = new Date(),
  policy: SamplePolicy = DEFAULT_SAMPLE_POLICY,
): BankSummary {
  const t = now.getTime()
  const soon = t + policy.restockThresholdDays * DAY_MS
  const kinds: Record<SampleKind, KindSummary> = {
    target: { byStatus: emptyByStatus(), expiringSoon: 0, renewSoon: 0 },
    control: { byStatus: emptyByStatus(), expiringSoon: 0, renewSoon: 0 },
  }
  let openUses = 0
  let overdueUses = 0
  for (const sample of samples) {
    const state = sampleState(sample, uses, now, policy)
    const k = kinds[sample.kind]
    k.byStatus[state.status] += 1
    if ((state.status === 'usable' || state.status === 'maintenance-only') && Date.parse(state.expiresAt) <= soon) k.expiringSoon += 1
    if (state.status === 'usable' && Date.parse(state.renewAt) <= soon) k.renewSoon += 1
    if (state.openUse) openUses += 1
    if (state.overdueUse) overdueUses += 1
  }
  return { ...kinds, openUses, overdueUses }
}

export interface RestockState {
  restockDue: boolean
  /** How many low-stock episodes this household has had; the reminder is keyed on it. */
  episode: number
}

/**
 * The next restocking state from the previous one and a fresh forecast. A low-stock episode starts when either kind
 * becomes due for restocking after neither was; `remind` is true exactly then (one reminder per episode), and the
 * episode ends when both kinds are healthy again.
 */
export function restockTransition(
  prev: RestockState | null,
  forecast: StockForecast,
): RestockState & { remind: boolean, lowKinds: SampleKind[] } {
  const lowKinds = SAMPLE_KINDS.filter(k => forecast[k].restockDue)
  const due = lowKinds.length > 0
  const before = prev ?? { restockDue: false, episode: 0 }
  const starts = due && !before.restockDue
  return { restockDue: due, episode: before.episode + (starts ? 1 : 0), remind: starts, lowKinds }
}

/** What the roster shows for a household's bank (kept with the household's stock status). */
export interface SampleRosterValue {
  restockDue: boolean
  target: { usesLeft: number, daysLeft: number | null, restockDue: boolean }
  control: { usesLeft: number, daysLeft: number | null, restockDue: boolean }
  /** Compromised samples not overridden (quick saves still waiting for their checklist are counted apart). */
  compromised: number
  awaitingAnswers: number
  expiringSoon: number
  overdueUses: number
  /** When the collection reminder of the current low-stock episode was queued; null when stock is healthy. */
  reminderQueuedAt: string | null
}

/** `awaitingAnswers`: quick-saved samples among the compromised ones (their checklist is not answered yet). */
export function stockRosterValue(forecast: StockForecast, summary: BankSummary, reminderQueuedAt: Date | null, awaitingAnswers = 0): SampleRosterValue {
  const kind = (k: SampleKind) => ({ usesLeft: forecast[k].usesLeft, daysLeft: forecast[k].daysLeft, restockDue: forecast[k].restockDue })
  return {
    restockDue: forecast.target.restockDue || forecast.control.restockDue,
    target: kind('target'),
    control: kind('control'),
    compromised: Math.max(0, summary.target.byStatus.compromised + summary.control.byStatus.compromised - awaitingAnswers),
    awaitingAnswers,
    expiringSoon: summary.target.expiringSoon + summary.control.expiringSoon,
    overdueUses: summary.overdueUses,
    reminderQueuedAt: reminderQueuedAt?.toISOString() ?? null,
  }
}

/** Words for a sample's status on screen; 'awaiting-answers' is a quick save whose checklist is not answered yet. */
export const SAMPLE_STATUS_LABELS: Record<SampleStatus | BagState, string> = {
  usable: 'Ready',
  ready: 'Ready',
  'maintenance-only': 'Maintenance only',
  out: 'Out of the freezer',
  'to-store': 'Not in the freezer yet',
  expired: 'Expired',
  'used-up': 'Used up',
  compromised: 'Compromised',
  'kept-out': 'Kept out of training',
  discarded: 'Thrown away',
  'awaiting-answers': 'Checklist to finish',
}
