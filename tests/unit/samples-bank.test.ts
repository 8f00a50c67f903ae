// The sample bank's summary, restocking episodes, roster value, policy setting and the phone checklist's answers.
// Policy figures (183/365 days, 3 uses, 5 minutes, 21 days' warning, 45/15 minutes) are common practice; the 28-day
// window is our own choice; every other figure is our own arithmetic on invented samples.
import { describe, expect, it } from 'vitest'
import {
  DEFAULT_SAMPLE_POLICY, bankSummary, restockTransition, stockForecast, stockRosterValue,
  type Sample, type SampleUse,
} from '../../shared/utils/samples'
import { samplePolicySchema, samplePolicySetting } from '../../shared/schemas/settings-samples'
import { sampleCreateSchema, sampleStoreSchema, useCreateSchema } from '../../shared/schemas/samples'
import { TRAINING_STAGES } from '../../shared/utils/enums'
import { buildAnswers, emptyChoices, answered } from '../../composables/sampleChecklist'
import { fromLocalInput, toLocalInput } from '../../composables/useSampleFormat'

const DAY = 86_400_000
const MIN = 60_000
const now = new Date('2026-06-01T12:00:00Z')
const ago = (days: number) => new Date(now.getTime() - days * DAY)
const sample = (id: string, kind: 'target' | 'control', days: number, over: Partial<Sample> = {}): Sample => ({ id, kind, collectedAt: ago(days), compromised: false, ...over })
const use = (sampleId: string, days: number, over: Partial<SampleUse> = {}): SampleUse => ({ sampleId, outAt: ago(days), backAt: new Date(ago(days).getTime() + 3 * MIN), discarded: false, stage: 'discrimination', ...over })

describe('bankSummary', () => {
  it('counts samples by kind and status, and what falls due within 21 days (common practice)', () => {
    const samples = [
      sample('t1', 'target', 10),
      sample('t2', 'target', 170), // renews at day 183: within 21 days
      sample('t3', 'target', 350), // maintenance-only, expires at day 365: within 21 days
      sample('t4', 'target', 400), // expired
      sample('c1', 'control', 5, { compromised: true }),
      sample('c2', 'control', 5),
      sample('c3', 'control', 20, { discardedAt: ago(1) }),
    ]
    const uses = [use('c2', 1), use('c2', 2), use('c2', 3), { ...use('t1', 0), outAt: new Date(now.getTime() - 6 * MIN), backAt: null }]
    const s = bankSummary(samples, uses, now, DEFAULT_SAMPLE_POLICY)
    expect(s.target.byStatus).toMatchObject({ usable: 2, 'maintenance-only': 1, expired: 1 })
    expect(s.target.renewSoon).toBe(1)
    expect(s.target.expiringSoon).toBe(1)
    expect(s.control.byStatus).toMatchObject({ compromised: 1, 'used-up': 1, discarded: 1, usable: 0 })
    // t1 has been out 6 minutes: longer than 5 (common practice).
    expect(s.openUses).toBe(1)
    expect(s.overdueUses).toBe(1)
  })
})

describe('restockTransition', () => {
  const healthy = stockForecast([sample('t', 'target', 1), sample('c', 'control', 1)], [], now)
  const low = stockForecast([sample('c', 'control', 1)], [], now) // no targets at all
  it('starts an episode and reminds once when stock turns low, then stays quiet while it is low', () => {
    const first = restockTransition(null, low)
    expect(first).toEqual({ restockDue: true, episode: 1, remind: true, lowKinds: ['target'] })
    const again = restockTransition(first, low)
    expect(again).toMatchObject({ restockDue: true, episode: 1, remind: false })
  })
  it('ends the episode when stock is healthy; the next low spell is a new episode with its own reminder', () => {
    const ended = restockTransition({ restockDue: true, episode: 1 }, healthy)
    expect(ended).toMatchObject({ restockDue: false, episode: 1, remind: false, lowKinds: [] })
    expect(restockTransition(ended, low)).toMatchObject({ restockDue: true, episode: 2, remind: true })
  })
})

describe('stockRosterValue', () => {
  it('summarises the forecast for the roster, counting quick saves apart from compromised samples', () => {
    const samples = [sample('t1', 'target', 3), sample('t2', 'target', 1, { compromised: true }), sample('c1', 'control', 2, { compromised: true })]
    const uses = [use('t1', 7)] // one use in 28 days
    const f = stockForecast(samples, uses, now)
    const v = stockRosterValue(f, bankSummary(samples, uses, now), null, 1)
    // t1: 2 uses left; the target bank is 3 days old, so its 1 use is measured over the 7-day minimum (not the
    // 28-day window): 2 × 7 ÷ 1 = 14 days → due (≤ 21). Controls: none usable.
    expect(v.target).toEqual({ usesLeft: 2, daysLeft: 14, restockDue: true })
    expect(v.control).toEqual({ usesLeft: 0, daysLeft: 0, restockDue: true })
    expect(v).toMatchObject({ restockDue: true, compromised: 1, awaitingAnswers: 1, reminderQueuedAt: null })
  })
})

describe('the sample policy setting', () => {
  it('defaults to the common-practice figures and validates changes', () => {
    expect(samplePolicySetting.defaults).toEqual({ ...DEFAULT_SAMPLE_POLICY })
    expect(samplePolicySchema.safeParse({ ...DEFAULT_SAMPLE_POLICY, maxRollsPerBag: 8 }).success).toBe(true)
    expect(samplePolicySchema.safeParse({ ...DEFAULT_SAMPLE_POLICY, maxRollsPerBag: 0 }).success).toBe(false)
    expect(samplePolicySchema.safeParse({ ...DEFAULT_SAMPLE_POLICY, renewAfterDays: 400 }).success).toBe(false) // after expiry
  })
})

describe('request schemas', () => {
  it('reads ISO instants as Dates and refuses times without an offset', () => {
    const ok = sampleCreateSchema.parse({ kind: 'control', collectedAt: '2026-06-01T07:00:00.000Z', rolls: 3 })
    expect(ok.collectedAt).toEqual(new Date('2026-06-01T07:00:00Z'))
    expect(ok.answers).toBeUndefined()
    expect(sampleCreateSchema.safeParse({ kind: 'control', collectedAt: '2026-06-01 07:00', rolls: 3 }).success).toBe(false)
    expect(sampleCreateSchema.safeParse({ kind: 'saliva', collectedAt: '2026-06-01T07:00:00Z', rolls: 3 }).success).toBe(false)
  })
  it('knows the training stages (common practice) and stores into one outer bag or a new one', () => {
    expect(TRAINING_STAGES).toEqual(['imprinting', 'discrimination', 'alert', 'generalisation', 'maintenance'])
    expect(useCreateSchema.safeParse({ outAt: '2026-06-01T07:00:00Z', stage: 'napping' }).success).toBe(false)
    expect(sampleStoreSchema.safeParse({ outerBagId: 'x' }).success).toBe(true)
    expect(sampleStoreSchema.safeParse({ newOuterBag: { containerId: null } }).success).toBe(true)
    expect(sampleStoreSchema.safeParse({ newOuterBag: { containerId: 'a', newContainerLabel: 'Tub' } }).success).toBe(false)
    expect(sampleStoreSchema.safeParse({}).success).toBe(false)
  })
})

describe('the phone checklist', () => {
  it('turns the answers into times before collecting, nulls and unknowns', () => {
    const collected = new Date('2026-06-01T07:00:00Z')
    const c = emptyChoices()
    c.lastAteAt = { choice: 'within', minutes: 20 }
    c.lastWaterAt = { choice: 'clear', minutes: null }
    c.lastSmokedAt = { choice: 'unknown', minutes: null }
    expect(answered(c.lastAteAt)).toBe(true)
    expect(answered({ choice: 'within', minutes: null })).toBe(false)
    const a = buildAnswers(c, collected, true)
    expect(a.lastAteAt).toBe('2026-06-01T06:40:00.000Z')
    expect(a.lastWaterAt).toBeNull()
    // Unanswered questions are sent as unknown: they never pass silently.
    expect(a.unknown).toEqual(['lastDrankOtherThanWaterAt', 'lastBrushedTeethAt', 'lastChewingGumAt', 'lastAlcoholAt', 'lastSmokedAt'])
    expect(a.washedHandsUnscented).toBe(true)
  })
  it('reads datetime-local inputs in the person\'s time zone, across summer time', () => {
    // London is UTC+1 in June and UTC+0 in January (from memory: British Summer Time).
    expect(fromLocalInput('2026-06-01T08:30', 'Europe/London')).toBe('2026-06-01T07:30:00.000Z')
    expect(fromLocalInput('2026-01-15T08:30', 'Europe/London')).toBe('2026-01-15T08:30:00.000Z')
    expect(toLocalInput(new Date('2026-06-01T07:30:00Z'), 'Europe/London')).toBe('2026-06-01T08:30')
    expect(fromLocalInput('not a time', 'Europe/London')).toBeNull()
  })
})

describe('the sample policy: young banks and over-limit uses', () => {
  it('keeps the new figures through the setting schema and refuses a minimum span over the window', () => {
    const parsed = samplePolicySchema.safeParse({ ...DEFAULT_SAMPLE_POLICY })
    expect(parsed.success && parsed.data).toMatchObject({ forecastMinDays: 7, overLimitIsLastUse: true })
    expect(samplePolicySchema.safeParse({ ...DEFAULT_SAMPLE_POLICY, forecastMinDays: 29 }).success).toBe(false)
  })
})
