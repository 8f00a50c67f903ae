// Scent-sample bank rules. Every figure from the policy (45 min fasting, 15 min water, 6 rolls, 5 bags, 183 and
// 365 days, 3 uses, 5 minutes out, single-use imprinting, 21 days' restock warning) is common practice; the 28-day
// forecast window and the 24-hour plausibility limit are our own choices. All other figures are our own arithmetic.
import { describe, expect, it } from 'vitest'
import {
  BAG_CODE_ALPHABET,
  DEFAULT_SAMPLE_POLICY,
  EXPOSURES,
  MAX_PLAUSIBLE_USE_MINUTES,
  bagCode,
  bagCodeKind,
  checkCollection,
  checkPacking,
  checkUse,
  checkUseReturn,
  isBagCode,
  normaliseBagCode,
  sampleState,
  seededRandom,
  stockForecast,
  uniqueBagCode,
  type CollectionAnswers,
  type Sample,
  type SampleUse,
} from '../../shared/utils/samples'

const MIN = 60_000
const DAY = 24 * 60 * MIN
const at = (iso: string): Date => new Date(iso)
const plus = (d: Date, ms: number): Date => new Date(d.getTime() + ms)
const rules = (list: Array<{ rule: string }>): string[] => list.map((p) => p.rule)

describe('DEFAULT_SAMPLE_POLICY', () => {
  it('holds the protocol figures', () => {
    expect(DEFAULT_SAMPLE_POLICY).toEqual({
      fastingMinutes: 45, // common practice
      waterFreeMinutes: 15, // common practice
      unscentedSoapRequired: true, // common practice
      maxRollsPerBag: 6, // common practice
      maxBagsPerOuterBag: 5, // common practice
      renewAfterDays: 183, // common practice
      expireAfterDays: 365, // common practice
      maxUsesPerSample: 3, // common practice
      maxMinutesOutPerUse: 5, // common practice
      imprintingSingleUse: true, // common practice
      restockThresholdDays: 21, // common practice
      forecastWindowDays: 28, // our own choice
      forecastMinDays: 7, // our own choice: a week
      overLimitIsLastUse: true, // common practice
      targetMaxMinutesAfterSymptoms: 60, // common practice
      flagMedicatedTargets: true, // common practice
    })
    expect(Object.isFrozen(DEFAULT_SAMPLE_POLICY)).toBe(true)
    expect(MAX_PLAUSIBLE_USE_MINUTES).toBe(1440) // our own choice: 24 hours
  })
})

describe('checkCollection', () => {
  const collectedAt = at('2025-03-10T08:00:00Z')
  const now = at('2025-03-10T09:00:00Z')
  const good = (over: Partial<CollectionAnswers> = {}): CollectionAnswers => ({
    kind: 'control',
    collectedAt,
    firstSymptomsAt: null,
    lastAteAt: plus(collectedAt, -3 * 60 * MIN),
    lastDrankOtherThanWaterAt: null,
    lastBrushedTeethAt: plus(collectedAt, -2 * 60 * MIN),
    lastChewingGumAt: null,
    lastAlcoholAt: null,
    lastSmokedAt: null,
    lastWaterAt: plus(collectedAt, -60 * MIN),
    washedHandsUnscented: true,
    rolls: 3,
    ...over,
  })

  it('passes answers that keep the protocol', () => {
    const r = checkCollection(good(), DEFAULT_SAMPLE_POLICY, now)
    expect(r).toMatchObject({ ok: true, valid: true, compromised: false, compromising: [], invalid: [], broken: [] })
  })

  it('fasting: exactly 45 minutes after eating is fine, 44 minutes compromises (common practice)', () => {
    expect(checkCollection(good({ lastAteAt: plus(collectedAt, -45 * MIN) }), DEFAULT_SAMPLE_POLICY, now).ok).toBe(
      true,
    )
    const r = checkCollection(good({ lastAteAt: plus(collectedAt, -44 * MIN) }), DEFAULT_SAMPLE_POLICY, now)
    expect(r.ok).toBe(false)
    expect(r.valid).toBe(true) // saved, but marked compromised
    expect(r.compromised).toBe(true)
    expect(rules(r.compromising)).toEqual(['fasting-food'])
    expect(r.compromising[0]?.message).toContain('44 minutes')
    expect(r.compromising[0]?.message).toContain('45 minutes')
    // 44 min 59 s is still short of 45 minutes.
    const nearly = checkCollection(
      good({ lastAteAt: plus(collectedAt, -(45 * MIN - 1000)) }),
      DEFAULT_SAMPLE_POLICY,
      now,
    )
    expect(rules(nearly.compromising)).toEqual(['fasting-food'])
  })

  it.each([
    ['lastDrankOtherThanWaterAt', 'fasting-drink'],
    ['lastBrushedTeethAt', 'fasting-teeth'],
    ['lastChewingGumAt', 'fasting-gum'],
    ['lastAlcoholAt', 'fasting-alcohol'],
    ['lastSmokedAt', 'fasting-smoking'],
  ] as const)('fasting applies to %s: 45 min ok, 44 min → %s (common practice)', (key, rule) => {
    expect(checkCollection(good({ [key]: plus(collectedAt, -45 * MIN) }), DEFAULT_SAMPLE_POLICY, now).ok).toBe(true)
    const r = checkCollection(good({ [key]: plus(collectedAt, -44 * MIN) }), DEFAULT_SAMPLE_POLICY, now)
    expect(rules(r.compromising)).toEqual([rule])
    expect(r.invalid).toEqual([])
  })

  it('water: exactly 15 minutes is fine, 14 minutes compromises (common practice)', () => {
    expect(checkCollection(good({ lastWaterAt: plus(collectedAt, -15 * MIN) }), DEFAULT_SAMPLE_POLICY, now).ok).toBe(
      true,
    )
    const r = checkCollection(good({ lastWaterAt: plus(collectedAt, -14 * MIN) }), DEFAULT_SAMPLE_POLICY, now)
    expect(rules(r.compromising)).toEqual(['water-free'])
    expect(r.compromising[0]?.message).toContain('15 minutes')
    // Water 20 minutes before is fine even though it is inside the 45-minute fasting time.
    expect(checkCollection(good({ lastWaterAt: plus(collectedAt, -20 * MIN) }), DEFAULT_SAMPLE_POLICY, now).ok).toBe(
      true,
    )
  })

  it('"don\'t know" and an unanswered question both compromise the sample', () => {
    const unsure = checkCollection(good({ unknown: ['lastAteAt', 'lastWaterAt'] }), DEFAULT_SAMPLE_POLICY, now)
    expect(rules(unsure.compromising)).toEqual(['fasting-food', 'water-free'])
    expect(unsure.compromising[0]?.message).toMatch(/weren't sure/)
    const answers = good()
    delete answers.lastSmokedAt
    const missing = checkCollection(answers, DEFAULT_SAMPLE_POLICY, now)
    expect(rules(missing.compromising)).toEqual(['fasting-smoking'])
    expect(missing.compromising[0]?.message).toMatch(/no answer/)
    // Every exposure question is covered by some rule.
    const allUnknown = checkCollection(good({ unknown: [...EXPOSURES] }), DEFAULT_SAMPLE_POLICY, now)
    expect(allUnknown.compromising).toHaveLength(EXPOSURES.length)
  })

  it('null means "not in the relevant time" and passes', () => {
    const r = checkCollection(
      good({ lastAteAt: null, lastBrushedTeethAt: null, lastWaterAt: null }),
      DEFAULT_SAMPLE_POLICY,
      now,
    )
    expect(r.ok).toBe(true)
  })

  it('unscented soap is required (common practice), unless the policy turns it off', () => {
    const r = checkCollection(good({ washedHandsUnscented: false }), DEFAULT_SAMPLE_POLICY, now)
    expect(rules(r.compromising)).toEqual(['unscented-soap'])
    const relaxed = { ...DEFAULT_SAMPLE_POLICY, unscentedSoapRequired: false }
    expect(checkCollection(good({ washedHandsUnscented: false }), relaxed, now).ok).toBe(true)
  })

  it('rolls: 6 in a bag is fine, 7 is refused (common practice); 0 and fractions are refused', () => {
    expect(checkCollection(good({ rolls: 6 }), DEFAULT_SAMPLE_POLICY, now).ok).toBe(true)
    expect(checkCollection(good({ rolls: 1 }), DEFAULT_SAMPLE_POLICY, now).ok).toBe(true)
    const seven = checkCollection(good({ rolls: 7 }), DEFAULT_SAMPLE_POLICY, now)
    expect(seven.valid).toBe(false)
    expect(rules(seven.invalid)).toEqual(['rolls-over-limit'])
    expect(seven.invalid[0]?.message).toContain('6 cotton rolls')
    expect(seven.compromising).toEqual([])
    expect(rules(checkCollection(good({ rolls: 0 }), DEFAULT_SAMPLE_POLICY, now).invalid)).toEqual(['rolls-below-one'])
    expect(rules(checkCollection(good({ rolls: 2.5 }), DEFAULT_SAMPLE_POLICY, now).invalid)).toEqual([
      'rolls-not-whole',
    ])
  })

  it('refuses a collection time in the future, but accepts one exactly now', () => {
    expect(checkCollection(good(), DEFAULT_SAMPLE_POLICY, collectedAt).ok).toBe(true)
    const r = checkCollection(good(), DEFAULT_SAMPLE_POLICY, plus(collectedAt, -1000))
    expect(rules(r.invalid)).toEqual(['collected-in-future'])
    expect(rules(checkCollection(good({ collectedAt: new Date('nope') }), DEFAULT_SAMPLE_POLICY, now).invalid)).toEqual(
      ['collected-at-invalid'],
    )
  })

  it('a target needs a first-symptoms time no later than the collection', () => {
    const none = checkCollection(good({ kind: 'target', firstSymptomsAt: null }), DEFAULT_SAMPLE_POLICY, now)
    expect(rules(none.invalid)).toEqual(['target-needs-first-symptoms'])
    const after = checkCollection(
      good({ kind: 'target', firstSymptomsAt: plus(collectedAt, MIN) }),
      DEFAULT_SAMPLE_POLICY,
      now,
    )
    expect(rules(after.invalid)).toEqual(['first-symptoms-after-collection'])
    const ok = checkCollection(
      good({ kind: 'target', firstSymptomsAt: plus(collectedAt, -10 * MIN) }),
      DEFAULT_SAMPLE_POLICY,
      now,
    )
    expect(ok.ok).toBe(true)
    const same = checkCollection(good({ kind: 'target', firstSymptomsAt: collectedAt }), DEFAULT_SAMPLE_POLICY, now)
    expect(same.ok).toBe(true)
  })

  it('a control with first symptoms is refused', () => {
    const r = checkCollection(good({ firstSymptomsAt: plus(collectedAt, -5 * MIN) }), DEFAULT_SAMPLE_POLICY, now)
    expect(rules(r.invalid)).toEqual(['control-has-first-symptoms'])
  })

  it('refuses a "last…" time after the collection', () => {
    const r = checkCollection(good({ lastAteAt: plus(collectedAt, 10 * MIN) }), DEFAULT_SAMPLE_POLICY, now)
    expect(rules(r.invalid)).toEqual(['exposure-after-collection'])
    expect(r.compromising).toEqual([])
  })

  it('reports input errors and compromising rules separately, and together in broken', () => {
    const r = checkCollection(
      good({ rolls: 9, washedHandsUnscented: false, lastAteAt: plus(collectedAt, -10 * MIN) }),
      DEFAULT_SAMPLE_POLICY,
      now,
    )
    expect(rules(r.invalid)).toEqual(['rolls-over-limit'])
    expect(rules(r.compromising)).toEqual(['fasting-food', 'unscented-soap'])
    expect(rules(r.broken)).toEqual(['rolls-over-limit', 'fasting-food', 'unscented-soap'])
    expect(r.ok).toBe(false)
  })
})

describe('sampleState', () => {
  const collectedAt = at('2025-01-01T09:00:00Z')
  const sample = (over: Partial<Sample> = {}): Sample => ({
    id: 's1',
    kind: 'target',
    collectedAt,
    compromised: false,
    overrideReason: null,
    discardedAt: null,
    ...over,
  })
  const use = (outAt: Date, over: Partial<SampleUse> = {}): SampleUse => ({
    sampleId: 's1',
    outAt,
    backAt: plus(outAt, 3 * MIN),
    discarded: false,
    stage: 'discrimination',
    ...over,
  })
  const state = (s: Sample, uses: SampleUse[], now: Date) => sampleState(s, uses, now, DEFAULT_SAMPLE_POLICY)

  it('gives renewal and expiry instants: +183 days and +365 days (common practice)', () => {
    const st = state(sample(), [], plus(collectedAt, DAY))
    expect(st.status).toBe('usable')
    expect(st.usesLeft).toBe(3)
    // 2025-01-01 + 183 days = 2025-07-03 (Jan 30 left + Feb 28 + Mar 31 + Apr 30 + May 31 + Jun 30 = 180, + 3).
    expect(st.renewAt).toBe('2025-07-03T09:00:00.000Z')
    // 2025 is not a leap year, so + 365 days is the same date a year on.
    expect(st.expiresAt).toBe('2026-01-01T09:00:00.000Z')
  })

  it('day 183 is usable, day 184 maintenance-only (common practice)', () => {
    expect(state(sample(), [], plus(collectedAt, 183 * DAY)).status).toBe('usable')
    expect(state(sample(), [], plus(collectedAt, 183 * DAY + 1)).status).toBe('maintenance-only')
    expect(state(sample(), [], plus(collectedAt, 184 * DAY)).status).toBe('maintenance-only')
  })

  it('day 365 is still maintenance-only, day 366 expired (common practice)', () => {
    expect(state(sample(), [], plus(collectedAt, 365 * DAY)).status).toBe('maintenance-only')
    expect(state(sample(), [], plus(collectedAt, 365 * DAY + 1)).status).toBe('expired')
    expect(state(sample(), [], plus(collectedAt, 366 * DAY)).status).toBe('expired')
  })

  it('counts uses: after 2 one is left, after 3 the sample is used up (common practice: 3 uses)', () => {
    const now = plus(collectedAt, 10 * DAY)
    const u1 = use(plus(collectedAt, DAY))
    const u2 = use(plus(collectedAt, 2 * DAY))
    const u3 = use(plus(collectedAt, 3 * DAY))
    expect(state(sample(), [u1, u2], now)).toMatchObject({ status: 'usable', usesLeft: 1 })
    expect(state(sample(), [u1, u2, u3], now)).toMatchObject({ status: 'used-up', usesLeft: 0 })
    // Uses of other samples do not count.
    expect(state(sample(), [u1, { ...u2, sampleId: 'other' }], now)).toMatchObject({ usesLeft: 2 })
  })

  it('an imprinting use discards the sample (common practice), unless the policy allows reuse', () => {
    const now = plus(collectedAt, 10 * DAY)
    const imprint = use(plus(collectedAt, DAY), { stage: 'Imprinting' })
    expect(state(sample(), [imprint], now)).toMatchObject({ status: 'discarded', usesLeft: 0 })
    const reuse = { ...DEFAULT_SAMPLE_POLICY, imprintingSingleUse: false }
    expect(sampleState(sample(), [imprint], now, reuse)).toMatchObject({ status: 'usable', usesLeft: 2 })
  })

  it('a use marked discarded, or a discard date, discards the sample', () => {
    const now = plus(collectedAt, 10 * DAY)
    expect(state(sample(), [use(plus(collectedAt, DAY), { discarded: true })], now).status).toBe('discarded')
    expect(state(sample({ discardedAt: plus(collectedAt, 2 * DAY) }), [], now).status).toBe('discarded')
    // A discard dated after `now` has not happened yet.
    expect(state(sample({ discardedAt: plus(collectedAt, 20 * DAY) }), [], now).status).toBe('usable')
  })

  it('follows the precedence discarded > used-up > expired > compromised > maintenance-only > usable', () => {
    const old = plus(collectedAt, 400 * DAY)
    const three = [1, 2, 3].map((d) => use(plus(collectedAt, d * DAY)))
    expect(state(sample({ discardedAt: collectedAt, compromised: true }), three, old).status).toBe('discarded')
    expect(state(sample({ compromised: true }), three, old).status).toBe('used-up')
    expect(state(sample({ compromised: true }), [], old).status).toBe('expired')
    expect(state(sample({ compromised: true }), [], plus(collectedAt, 200 * DAY)).status).toBe('compromised')
    expect(state(sample(), [], plus(collectedAt, 200 * DAY)).status).toBe('maintenance-only')
  })

  it('a compromised sample with an override reason is usable; a blank reason is no override', () => {
    const now = plus(collectedAt, DAY)
    expect(state(sample({ compromised: true }), [], now)).toMatchObject({ status: 'compromised', overridden: false })
    expect(state(sample({ compromised: true, overrideReason: '   ' }), [], now).status).toBe('compromised')
    expect(state(sample({ compromised: true, overrideReason: 'Only target we have for this episode type' }), [], now))
      .toMatchObject({ status: 'usable', overridden: true })
  })

  it('flags an open use, and an open use longer than 5 minutes as overdue (common practice)', () => {
    const outAt = plus(collectedAt, DAY)
    const open = use(outAt, { backAt: null })
    expect(state(sample(), [open], plus(outAt, 5 * MIN))).toMatchObject({ openUse: true, overdueUse: false })
    expect(state(sample(), [open], plus(outAt, 5 * MIN + 1000))).toMatchObject({ openUse: true, overdueUse: true })
    expect(state(sample(), [use(outAt)], plus(outAt, 60 * MIN))).toMatchObject({ openUse: false, overdueUse: false })
  })
})

describe('checkUse', () => {
  const collectedAt = at('2025-01-01T09:00:00Z')
  const s: Sample = { id: 's1', kind: 'control', collectedAt, compromised: false }
  const prior = (n: number): SampleUse[] =>
    Array.from({ length: n }, (_, i) => ({
      sampleId: 's1',
      outAt: plus(collectedAt, (i + 1) * DAY),
      backAt: plus(collectedAt, (i + 1) * DAY + 3 * MIN),
      discarded: false,
      stage: 'discrimination',
    }))
  const outAt = plus(collectedAt, 10 * DAY)
  const now = plus(outAt, 60 * MIN)

  it('allows the third use and refuses the fourth (common practice: 3 uses)', () => {
    const third = checkUse({ sample: s, uses: prior(2), use: { outAt, backAt: plus(outAt, 4 * MIN) }, now })
    expect(third).toMatchObject({ ok: true, refused: [], invalid: [], warnings: [], overLimit: false })
    const fourth = checkUse({ sample: s, uses: prior(3), use: { outAt, backAt: plus(outAt, 4 * MIN) }, now })
    expect(fourth.ok).toBe(false)
    expect(rules(fourth.refused)).toEqual(['used-up'])
    expect(fourth.refused[0]?.message).toContain('3')
  })

  it('a maintenance-only sample needs a maintenance session (common practice: after 183 days)', () => {
    const lateOut = plus(collectedAt, 200 * DAY)
    const lateNow = plus(lateOut, 10 * MIN)
    const use = { outAt: lateOut, backAt: plus(lateOut, 3 * MIN) }
    const r = checkUse({ sample: s, uses: [], use, now: lateNow })
    expect(rules(r.refused)).toEqual(['maintenance-only'])
    expect(r.refused[0]?.message).toContain('183 days')
    expect(checkUse({ sample: s, uses: [], use, now: lateNow, maintenanceSession: true }).ok).toBe(true)
  })

  it('refuses expired, compromised and discarded samples', () => {
    const lateOut = plus(collectedAt, 366 * DAY)
    const expired = checkUse({
      sample: s,
      uses: [],
      use: { outAt: lateOut, backAt: null },
      now: plus(lateOut, MIN),
      maintenanceSession: true,
    })
    expect(rules(expired.refused)).toEqual(['expired'])
    const compromised = checkUse({ sample: { ...s, compromised: true }, uses: [], use: { outAt, backAt: null }, now })
    expect(rules(compromised.refused)).toEqual(['compromised'])
    const discarded = checkUse({ sample: { ...s, discardedAt: collectedAt }, uses: [], use: { outAt, backAt: null }, now })
    expect(rules(discarded.refused)).toEqual(['discarded'])
  })

  it('refuses a second open use of the same sample', () => {
    const open: SampleUse = { sampleId: 's1', outAt: plus(outAt, -10 * MIN), backAt: null, discarded: false }
    const r = checkUse({ sample: s, uses: [open], use: { outAt, backAt: null }, now })
    expect(rules(r.refused)).toEqual(['another-use-open'])
  })

  it('times: back must be after out; over 5 minutes is flagged; over 24 hours refused', () => {
    const back = (ms: number) => checkUse({ sample: s, uses: [], use: { outAt, backAt: plus(outAt, ms) }, now: plus(outAt, 2 * DAY) })
    expect(rules(back(-MIN).invalid)).toEqual(['back-before-out'])
    expect(rules(back(0).invalid)).toEqual(['back-before-out'])
    // Exactly 5 minutes is within the limit (common practice: 5 minutes out per use).
    expect(back(5 * MIN)).toMatchObject({ ok: true, overLimit: false, warnings: [] })
    const six = back(6 * MIN)
    expect(six).toMatchObject({ ok: true, overLimit: true })
    expect(rules(six.warnings)).toEqual(['over-time-limit'])
    expect(six.warnings[0]?.message).toContain('6 minutes')
    // Exactly 24 hours is odd but possible; longer is a typing mistake (our own limit).
    expect(back(24 * 60 * MIN).ok).toBe(true)
    expect(rules(back(24 * 60 * MIN + 1000).invalid)).toEqual(['use-implausibly-long'])
  })

  it('refuses times in the future, before collection, or overlapping another use', () => {
    expect(rules(checkUse({ sample: s, uses: [], use: { outAt: plus(now, MIN), backAt: null }, now }).invalid)).toEqual(
      ['out-in-future'],
    )
    expect(
      rules(checkUse({ sample: s, uses: [], use: { outAt, backAt: plus(now, MIN) }, now }).invalid),
    ).toEqual(['back-in-future'])
    expect(
      rules(checkUse({ sample: s, uses: [], use: { outAt: plus(collectedAt, -MIN), backAt: null }, now }).invalid),
    ).toEqual(['out-before-collection'])
    const earlier: SampleUse = { sampleId: 's1', outAt, backAt: plus(outAt, 4 * MIN), discarded: false }
    const overlapping = checkUse({
      sample: s,
      uses: [earlier],
      use: { outAt: plus(outAt, 2 * MIN), backAt: plus(outAt, 6 * MIN) },
      now,
    })
    expect(rules(overlapping.invalid)).toEqual(['overlaps-other-use'])
    const after = checkUse({
      sample: s,
      uses: [earlier],
      use: { outAt: plus(outAt, 4 * MIN), backAt: plus(outAt, 8 * MIN) },
      now,
    })
    expect(after.ok).toBe(true)
  })

  it('says when saving the use discards the sample (imprinting, common practice)', () => {
    expect(checkUse({ sample: s, uses: [], use: { outAt, backAt: null, stage: 'imprinting' }, now }).discards).toBe(
      true,
    )
    expect(checkUse({ sample: s, uses: [], use: { outAt, backAt: null, stage: 'discrimination' }, now }).discards).toBe(
      false,
    )
    expect(checkUse({ sample: s, uses: [], use: { outAt, backAt: null, discarded: true }, now }).discards).toBe(true)
  })

  it('checkUseReturn validates closing an open use', () => {
    const open = { outAt, backAt: null }
    expect(checkUseReturn(open, plus(outAt, 4 * MIN), now)).toMatchObject({ ok: true, overLimit: false })
    expect(checkUseReturn(open, plus(outAt, 7 * MIN), now)).toMatchObject({ ok: true, overLimit: true })
    expect(rules(checkUseReturn(open, plus(outAt, -MIN), now).invalid)).toEqual(['back-before-out'])
    expect(rules(checkUseReturn({ outAt, backAt: plus(outAt, MIN) }, plus(outAt, 2 * MIN), now).invalid)).toEqual([
      'use-already-closed',
    ])
  })
})

describe('checkPacking', () => {
  it('accepts up to 5 small bags of one kind in an outer bag of that kind (common practice)', () => {
    expect(checkPacking({ bagKind: 'target', outerBagKind: 'target', outerBagCount: 5, containerKind: 'target' })).toEqual(
      { ok: true, problems: [] },
    )
    expect(checkPacking({ bagKind: 'control', outerBagKind: 'control', outerBagCount: 1, containerKind: null }).ok).toBe(
      true,
    )
  })

  it('refuses a 6th small bag in one outer bag', () => {
    const r = checkPacking({ bagKind: 'target', outerBagKind: 'target', outerBagCount: 6, containerKind: 'target' })
    expect(rules(r.problems)).toEqual(['outer-bag-full'])
    expect(r.problems[0]?.message).toContain('5 small bags')
    expect(rules(checkPacking({ bagKind: 'target', outerBagKind: 'target', outerBagCount: 0 }).problems)).toEqual([
      'outer-bag-count-invalid',
    ])
  })

  it('keeps targets and controls apart at every level', () => {
    const a = checkPacking({ bagKind: 'control', outerBagKind: 'target', outerBagCount: 2, containerKind: 'target' })
    expect(rules(a.problems)).toEqual(['bag-kind-mismatch'])
    expect(a.problems[0]?.message).toMatch(/control bag cannot go in a target outer bag/)
    const b = checkPacking({ bagKind: 'target', outerBagKind: 'control', outerBagCount: 2, containerKind: 'control' })
    expect(rules(b.problems)).toEqual(['bag-kind-mismatch'])
    const c = checkPacking({ bagKind: 'control', outerBagKind: 'control', outerBagCount: 2, containerKind: 'target' })
    expect(rules(c.problems)).toEqual(['container-kind-mismatch'])
    const all = checkPacking({ bagKind: 'target', outerBagKind: 'control', outerBagCount: 7, containerKind: 'target' })
    expect(rules(all.problems)).toEqual(['bag-kind-mismatch', 'outer-bag-full', 'container-kind-mismatch'])
  })
})

describe('stockForecast', () => {
  // Hand-worked example, default policy (28-day window, 3 uses, 183-day renewal, 21-day restock warning).
  // now = 2025-03-01 12:00 UTC; the window is (2025-02-01 12:00, 2025-03-01 12:00].
  //
  // Targets
  //   T1 collected 02-01, one use 02-20                      → usable, 2 left; consumed in window 1
  //   T2 collected 02-01, no uses                            → usable, 3 left
  //   T3 collected 01-15, one imprinting use 02-10           → discarded; that use cost all 3 uses → consumed 3
  //   T4 collected 2024-08-01 (> 183 days), one use 02-25    → maintenance-only, not counted; consumed 1
  //   T5 collected 01-01, uses 01-20 and 02-01 12:00 exactly → usable, 1 left; both uses outside the window
  //   usable 3 samples, uses left 2 + 3 + 1 = 6; consumed 1 + 3 + 1 = 5; rate 5/28 per day
  //   6 ÷ (5/28) = 168/5 = 33.6 days → daysLeft 33 (> 21: no restock), runs out 33 d 14 h 24 min after now
  //   = 2025-04-04 02:24 UTC (March has 31 days: 03-01 + 33 d = 04-03 12:00, + 14 h 24 min).
  //   ages out: newest usable samples T1/T2 renew at 02-01 + 183 d = 2025-08-03 (27 + 31 + 30 + 31 + 30 + 31 + 3).
  // Controls
  //   C1 collected 02-15, uses 02-16, 02-18, 02-20           → used up; consumed 3
  //   C2 collected 02-15, uses 02-22, 02-24                  → usable, 1 left; consumed 2
  //   The control bank is young: its first sample (02-15 00:00) is 14 d 12 h = 14.5 days old, under the 28-day
  //   window, so the rate is 5 / 14.5 per day (it was 5/28 when every bank was divided by the whole window).
  //   uses left 1; 1 × 14.5 ÷ 5 = 2.9 days → daysLeft 2 (≤ 21: restock), runs out
  //   03-01 12:00 + 2 d 21 h 36 min = 2025-03-04 09:36 UTC (it was 5.6 days, 03-07 02:24).
  const now = at('2025-03-01T12:00:00Z')
  const sample = (id: string, kind: 'target' | 'control', collected: string): Sample => ({
    id,
    kind,
    collectedAt: at(collected),
    compromised: false,
  })
  const use = (sampleId: string, outAt: string, stage = 'discrimination'): SampleUse => ({
    sampleId,
    outAt: at(outAt),
    backAt: plus(at(outAt), 3 * MIN),
    discarded: false,
    stage,
  })
  const samples: Sample[] = [
    sample('T1', 'target', '2025-02-01T00:00:00Z'),
    sample('T2', 'target', '2025-02-01T00:00:00Z'),
    sample('T3', 'target', '2025-01-15T00:00:00Z'),
    sample('T4', 'target', '2024-08-01T00:00:00Z'),
    sample('T5', 'target', '2025-01-01T00:00:00Z'),
    sample('C1', 'control', '2025-02-15T00:00:00Z'),
    sample('C2', 'control', '2025-02-15T00:00:00Z'),
  ]
  const uses: SampleUse[] = [
    use('T1', '2025-02-20T10:00:00Z'),
    use('T3', '2025-02-10T10:00:00Z', 'imprinting'),
    use('T4', '2025-02-25T10:00:00Z'),
    use('T5', '2025-01-20T10:00:00Z'),
    use('T5', '2025-02-01T12:00:00Z'),
    use('C1', '2025-02-16T10:00:00Z'),
    use('C1', '2025-02-18T10:00:00Z'),
    use('C1', '2025-02-20T10:00:00Z'),
    use('C2', '2025-02-22T10:00:00Z'),
    use('C2', '2025-02-24T10:00:00Z'),
    use('GONE', '2025-02-24T10:00:00Z'), // a sample not in the list: ignored
    use('T2', '2025-03-02T10:00:00Z'), // after now: ignored (and T2 then shows 2 left, see below)
  ]

  it('works out the hand-worked example', () => {
    const withoutFuture = uses.filter((u) => u.sampleId !== 'T2')
    const f = stockForecast(samples, withoutFuture, now, DEFAULT_SAMPLE_POLICY)
    expect(f.target).toEqual({
      usableSamples: 3,
      bags: { ready: 3, out: 0, toStore: 0 },
      maintenanceOnlySamples: 1,
      usesLeft: 6,
      ratePerDay: 5 / 28,
      rateDays: 28, // the oldest target (T4) is far older than the window
      runsOutAt: '2025-04-04T02:24:00.000Z',
      daysLeft: 33,
      agesOutAt: '2025-08-03T00:00:00.000Z',
      restockDue: false,
    })
    expect(f.control.ratePerDay).toBeCloseTo(5 / 14.5, 12)
    expect(f.control).toEqual({
      usableSamples: 1,
      bags: { ready: 1, out: 0, toStore: 0 },
      maintenanceOnlySamples: 0,
      usesLeft: 1,
      ratePerDay: f.control.ratePerDay,
      rateDays: 14.5,
      runsOutAt: '2025-03-04T09:36:00.000Z',
      daysLeft: 2,
      agesOutAt: '2025-08-17T00:00:00.000Z', // 02-15 + 183 d: 13 + 31 + 30 + 31 + 30 + 31 + 17
      restockDue: true,
    })
  })

  it('ignores uses dated after now in the rate (they still count against the sample)', () => {
    const f = stockForecast(samples, uses, now, DEFAULT_SAMPLE_POLICY)
    expect(f.target.ratePerDay).toBe(5 / 28)
    expect(f.target.usesLeft).toBe(5) // T2's future use leaves it 2
  })

  it('no use in the window: no rate, no run-out date', () => {
    const f = stockForecast([sample('T9', 'target', '2025-02-20T00:00:00Z')], [], now, DEFAULT_SAMPLE_POLICY)
    expect(f.target).toMatchObject({ usesLeft: 3, ratePerDay: 0, runsOutAt: null, daysLeft: null, restockDue: false })
  })

  it('nothing left: runs out now and restock is due', () => {
    const f = stockForecast([], [], now, DEFAULT_SAMPLE_POLICY)
    expect(f.control).toEqual({
      usableSamples: 0,
      bags: { ready: 0, out: 0, toStore: 0 },
      maintenanceOnlySamples: 0,
      usesLeft: 0,
      ratePerDay: 0,
      rateDays: 28, // no bank at all: the whole window
      runsOutAt: now.toISOString(),
      daysLeft: 0,
      agesOutAt: null,
      restockDue: true,
    })
  })

  it('restock is due at exactly 21 days left, not at 22 (common practice: 21 days)', () => {
    // 3 uses left; over 28 days: 4 uses → rate 1/7 per day → 21 days; 3 uses (rate 3/28) → 28 days.
    const fresh = [sample('A', 'target', '2025-02-25T00:00:00Z')]
    const past = (n: number) =>
      Array.from({ length: n }, (_, i) => ({
        ...use('OLD', `2025-02-${String(10 + i).padStart(2, '0')}T10:00:00Z`),
        sampleId: `OLD${i}`,
      }))
    // The OLD samples were collected before the window, so the rate is over the whole 28 days.
    const old = (n: number) => Array.from({ length: n }, (_, i) => sample(`OLD${i}`, 'target', '2025-01-05T00:00:00Z'))
    const f21 = stockForecast([...fresh, ...old(4)], past(4), now, DEFAULT_SAMPLE_POLICY)
    // Each OLD sample has 2 uses left, so the bank has 3 + 4 × 2 = 11 left: 11 ÷ (4/28) = 77 days.
    expect(f21.target).toMatchObject({ usesLeft: 11, daysLeft: 77, restockDue: false })
    const only = stockForecast(fresh, [], now, DEFAULT_SAMPLE_POLICY)
    expect(only.target.restockDue).toBe(false)
    // Sample A alone, uses by discarded samples: 4 uses in the window → 3 ÷ (4/28) = 21 days → due.
    const gone = (n: number) =>
      Array.from({ length: n }, (_, i) => sample(`OLD${i}`, 'target', '2025-01-05T00:00:00Z')).map((s) => ({
        ...s,
        discardedAt: at('2025-02-28T00:00:00Z'),
      }))
    const due = stockForecast([...fresh, ...gone(4)], past(4), now, DEFAULT_SAMPLE_POLICY)
    expect(due.target).toMatchObject({ usesLeft: 3, daysLeft: 21, restockDue: true })
    // 3 uses in the window → 3 ÷ (3/28) = 28 days → not due.
    const notDue = stockForecast([...fresh, ...gone(3)], past(3), now, DEFAULT_SAMPLE_POLICY)
    expect(notDue.target).toMatchObject({ usesLeft: 3, daysLeft: 28, restockDue: false })
  })

  it('restock is due when the usable samples turn maintenance-only within 21 days, however little is used', () => {
    // Collected 170 days before now: renews 13 days from now.
    const ageing = sample('A', 'control', new Date(now.getTime() - 170 * DAY).toISOString())
    const f = stockForecast([ageing], [], now, DEFAULT_SAMPLE_POLICY)
    expect(f.control).toMatchObject({ usesLeft: 3, ratePerDay: 0, daysLeft: null, restockDue: true })
    expect(f.control.agesOutAt).toBe(new Date(now.getTime() + 13 * DAY).toISOString())
  })
})

describe('bag codes', () => {
  it('uses an alphabet without 0, O, 1, I or L', () => {
    expect(BAG_CODE_ALPHABET).toHaveLength(31) // 26 letters − I, L, O + digits 2–9
    for (const ch of ['0', 'O', '1', 'I', 'L']) expect(BAG_CODE_ALPHABET).not.toContain(ch)
    expect(new Set(BAG_CODE_ALPHABET).size).toBe(31)
  })

  it('is deterministic with a seeded random source and starts T- or C-', () => {
    const a = bagCode('target', seededRandom(42))
    const b = bagCode('target', seededRandom(42))
    expect(a).toBe(b)
    expect(a).toMatch(/^T-[A-Z2-9]{4}$/)
    expect(isBagCode(a, 'target')).toBe(true)
    expect(isBagCode(a, 'control')).toBe(false)
    expect(bagCode('control', seededRandom(42))).toBe(`C-${a.slice(2)}`)
  })

  it('maps the random source onto the alphabet end to end', () => {
    expect(bagCode('target', () => 0)).toBe('T-AAAA')
    expect(bagCode('control', () => 0.999999)).toBe('C-9999')
    expect(() => bagCode('target', () => 1)).toThrow(RangeError)
    expect(() => bagCode('target', () => Number.NaN)).toThrow(RangeError)
  })

  it('reaches every character of the alphabet and only those', () => {
    const rnd = seededRandom(7)
    const seen = new Set<string>()
    for (let i = 0; i < 2000; i++) {
      const c = bagCode('control', rnd)
      expect(isBagCode(c)).toBe(true)
      for (const ch of c.slice(2)) seen.add(ch)
    }
    expect([...seen].sort().join('')).toBe([...BAG_CODE_ALPHABET].sort().join(''))
  })

  it('isBagCode rejects look-alikes and malformed codes', () => {
    for (const bad of ['T-O2AB', 'T-12AB', 'C-ILAB', 'X-ABCD', 'T-ABC', 'T-ABCDEF', 't-abcd', 'TABCD', ' T-ABCD']) {
      expect(isBagCode(bad)).toBe(false)
    }
    expect(isBagCode('T-ABCD')).toBe(true)
    // One character more: a code made on a phone (shared/utils/bag-codes.ts).
    expect(isBagCode('T-ABCDE', 'target')).toBe(true)
  })

  it('normalises a typed-back code and tells its kind', () => {
    expect(normaliseBagCode(' t7kq3 ')).toBe('T-7KQ3')
    expect(normaliseBagCode('c-h4xp')).toBe('C-H4XP')
    expect(bagCodeKind('T-7KQ3')).toBe('target')
    expect(bagCodeKind('C-H4XP')).toBe('control')
    expect(bagCodeKind('Q-H4XP')).toBeNull()
  })

  it('uniqueBagCode avoids codes already taken', () => {
    const first = bagCode('target', seededRandom(1))
    const next = uniqueBagCode('target', new Set([first]), seededRandom(1))
    expect(next).not.toBe(first)
    expect(isBagCode(next, 'target')).toBe(true)
    expect(() => uniqueBagCode('target', new Set(['T-AAAA']), () => 0, 5)).toThrow(RangeError)
  })
})
