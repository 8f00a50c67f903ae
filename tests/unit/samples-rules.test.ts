// The sample bank's second-pass rules: the rate of a young bank, a use over the time limit as the last use, and one
// function (bagState) deciding every bag's state for every screen and the forecast. Policy figures: 28-day window and
// 7-day minimum (our own choice), 3 uses, 5 minutes, 21 days' warning (common practice); every other figure is our own
// arithmetic on invented samples.
import { describe, expect, it } from 'vitest'
import {
  BAG_LIST_OF, DEFAULT_SAMPLE_POLICY, bagState, checkUse, checkUseReturn, discardReasonOf, sampleState, stockForecast, targetTiming,
  type Bag, type SampleUse,
} from '../../shared/utils/samples'

const MIN = 60_000
const DAY = 24 * 60 * MIN
const now = new Date('2026-03-01T12:00:00Z')
const ago = (ms: number) => new Date(now.getTime() - ms)
const bag = (id: string, collectedMsAgo: number, over: Partial<Bag> = {}): Bag => ({ id, kind: 'target', collectedAt: ago(collectedMsAgo), compromised: false, ...over })
const use = (sampleId: string, outMsAgo: number, over: Partial<SampleUse> = {}): SampleUse => ({
  sampleId, outAt: ago(outMsAgo), backAt: new Date(ago(outMsAgo).getTime() + 3 * MIN), discarded: false, stage: 'discrimination', ...over,
})

describe('stockForecast: a young bank is measured over its own age (at least 7 days)', () => {
  // Ten targets collected exactly 7 days ago; four imprinting uses this week, each throwing its sample away, so each
  // consumes the 3 uses the sample had: 12 consumed. Six samples left × 3 = 18 uses.
  const samples = Array.from({ length: 10 }, (_, i) => bag(`T${i}`, 7 * DAY))
  const uses = [1, 2, 4, 6].map((d, i) => use(`T${i}`, d * DAY, { stage: 'imprinting' }))

  it('new: 18 ÷ (12 / 7 days) = 10.5 days → restock due; old: 18 ÷ (12 / 28) = 42 days, not due', () => {
    const f = stockForecast(samples, uses, now).target
    expect(f).toMatchObject({ usableSamples: 6, usesLeft: 18, rateDays: 7, daysLeft: 10, restockDue: true })
    expect(f.ratePerDay).toBeCloseTo(12 / 7, 12)
    expect(f.runsOutAt).toBe(new Date(now.getTime() + 10.5 * DAY).toISOString())
    // The old rule is the same forecast with the whole window imposed (minimum = window).
    const old = stockForecast(samples, uses, now, { ...DEFAULT_SAMPLE_POLICY, forecastMinDays: 28 }).target
    expect(old).toMatchObject({ rateDays: 28, daysLeft: 42, restockDue: false })
  })

  it('a bank one day old is measured over the 7-day minimum, not one day', () => {
    // 10 samples, 3 single uses in its first day: 27 left. Over 7 days: 27 × 7 ÷ 3 = 63 days (over 1 day it would
    // read 9 days and ask a new household to restock at once).
    const young = Array.from({ length: 10 }, (_, i) => bag(`Y${i}`, 1 * DAY))
    const f = stockForecast(young, [use('Y0', 20 * 3600_000), use('Y1', 10 * 3600_000), use('Y2', 1 * 3600_000)], now).target
    expect(f).toMatchObject({ usesLeft: 27, rateDays: 7, daysLeft: 63, restockDue: false })
  })

  it('the span is the age between 7 and 28 days, and 28 beyond', () => {
    const span = (ageMs: number) => stockForecast([bag('A', ageMs)], [use('A', Math.min(ageMs, DAY) / 2)], now).target.rateDays
    expect(span(6 * DAY + 23 * 3600_000)).toBe(7)
    expect(span(7 * DAY)).toBe(7)
    expect(span(20 * DAY)).toBe(20)
    expect(span(20 * DAY + 12 * 3600_000)).toBe(20.5)
    expect(span(28 * DAY)).toBe(28)
    expect(span(40 * DAY)).toBe(28)
  })

  it('the age is the first sample of that kind ever collected, thrown away or not', () => {
    const gone = bag('OLD', 60 * DAY, { discardedAt: ago(30 * DAY) })
    const f = stockForecast([gone, bag('NEW', 3 * DAY)], [use('NEW', DAY)], now).target
    expect(f.rateDays).toBe(28)
  })
})

describe('a use over the time limit is the sample’s last (policy, on by default)', () => {
  const s = bag('S', 10 * DAY)
  const outAt = ago(DAY)

  it('exactly 5 minutes is still within the limit; 5 min 1 s throws the sample away', () => {
    const at5 = checkUse({ sample: s, uses: [], use: { outAt, backAt: new Date(outAt.getTime() + 5 * MIN) }, now })
    expect(at5).toMatchObject({ ok: true, overLimit: false, discards: false, warnings: [] })
    const over = checkUse({ sample: s, uses: [], use: { outAt, backAt: new Date(outAt.getTime() + 5 * MIN + 1000) }, now })
    expect(over).toMatchObject({ ok: true, overLimit: true, discards: true })
    expect(over.warnings[0]?.message).toMatch(/thawed, so this was its last use/)
  })

  it('with the policy off the use only warns, and the sample keeps its uses', () => {
    const policy = { ...DEFAULT_SAMPLE_POLICY, overLimitIsLastUse: false }
    const over = checkUse({ sample: s, uses: [], use: { outAt, backAt: new Date(outAt.getTime() + 9 * MIN) }, now, policy })
    expect(over).toMatchObject({ overLimit: true, discards: false })
    expect(over.warnings[0]?.message).toMatch(/keep it out no longer than 5 minutes/)
    const after = sampleState(s, [use('S', DAY, { overLimit: true })], now, policy)
    expect(after).toMatchObject({ status: 'usable', usesLeft: 2 })
  })

  it('a recorded over-limit use leaves the sample thrown away, and the forecast loses all it had left', () => {
    expect(sampleState(s, [use('S', DAY, { overLimit: true })], now).status).toBe('discarded')
    // Stock: S (over-limit use: consumes 3) and a fresh R; the bank is 10 days old. Consumed 3 in 10 days;
    // R has 3 left: 3 × 10 ÷ 3 = 10 days.
    const f = stockForecast([s, bag('R', 2 * DAY)], [use('S', DAY, { overLimit: true })], now).target
    expect(f).toMatchObject({ usableSamples: 1, usesLeft: 3, rateDays: 10, daysLeft: 10 })
  })

  it('putting a sample back after 6 minutes reports it, and says why it was thrown away', () => {
    const r = checkUseReturn({ outAt, backAt: null }, new Date(outAt.getTime() + 6 * MIN), now)
    expect(r).toMatchObject({ ok: true, overLimit: true })
    expect(discardReasonOf({ discarded: false, stage: 'discrimination', overLimit: true }, DEFAULT_SAMPLE_POLICY)).toBe('Out of the freezer longer than 5 minutes: that use was its last.')
    expect(discardReasonOf({ discarded: false, stage: 'discrimination', overLimit: false }, DEFAULT_SAMPLE_POLICY)).toBeNull()
    expect(discardReasonOf({ discarded: false, stage: 'imprinting', overLimit: false }, DEFAULT_SAMPLE_POLICY)).toBe('Single use in imprinting.')
  })
})

describe('bagState: one answer for every screen and the forecast', () => {
  it('the household card and the lists agree: 24 uses in 8 bags, 6 ready in the freezer and 2 to put away', () => {
    const bags = Array.from({ length: 8 }, (_, i) => bag(`B${i}`, 10 * DAY, { stored: i < 6 }))
    const f = stockForecast(bags, [], now).target
    expect(f).toMatchObject({ usableSamples: 8, usesLeft: 24, bags: { ready: 6, out: 0, toStore: 2 } })
    const views = bags.map(b => bagState(b, [], now))
    expect(views.filter(v => v.list === 'ready').length).toBe(6)
    expect(views.filter(v => v.list === 'to-finish').map(v => v.state)).toEqual(['to-store', 'to-store'])
    expect(views.filter(v => v.inStock).length).toBe(f.usableSamples)
  })

  it('a compromised bag not yet stored is listed as compromised, not "to finish", and has no use-until date', () => {
    const v = bagState(bag('C', DAY, { compromised: true, stored: false }), [], now)
    expect(v).toMatchObject({ state: 'compromised', list: 'not-for-training', inStock: false, useUntil: null, usesLeft: 0 })
    // Allowed by the trainer (a reason given), it is a bag to store like any other.
    expect(bagState(bag('C', DAY, { compromised: true, overrideReason: 'Kept for a maintenance line-up', stored: false }), [], now))
      .toMatchObject({ state: 'to-store', inStock: true, useUntil: new Date(now.getTime() - DAY + 365 * DAY).toISOString() })
  })

  it('follows its precedence: discarded > out > used-up > expired > awaiting answers > compromised > kept out > to store > maintenance only > ready', () => {
    const open = (id: string) => ({ ...use(id, MIN), backAt: null })
    expect(bagState(bag('D', DAY, { discardedAt: ago(MIN), stored: false }), [], now).state).toBe('discarded')
    // The third use is open: used up in number, but out of the freezer and must go back or be thrown away.
    expect(bagState(bag('O', 5 * DAY), [use('O', 3 * DAY), use('O', 2 * DAY), open('O')], now)).toMatchObject({ state: 'out', list: 'to-finish', inStock: false })
    expect(bagState(bag('U', 5 * DAY), [use('U', 3 * DAY), use('U', 2 * DAY), use('U', DAY)], now).state).toBe('used-up')
    expect(bagState(bag('E', 366 * DAY, { answersComplete: false }), [], now)).toMatchObject({ state: 'expired', useUntil: null })
    expect(bagState(bag('A', DAY, { answersComplete: false, stored: false }), [], now)).toMatchObject({ state: 'awaiting-answers', list: 'to-finish', inStock: false })
    expect(bagState(bag('K', DAY, { keptOut: true }), [], now)).toMatchObject({ state: 'kept-out', list: 'not-for-training', inStock: false, useUntil: null })
    expect(bagState(bag('M', 200 * DAY, { stored: false }), [], now)).toMatchObject({ state: 'to-store', inStock: false })
    expect(bagState(bag('M', 200 * DAY), [], now)).toMatchObject({ state: 'maintenance-only', list: 'ready', inStock: false })
    expect(bagState(bag('R', DAY), [open('R')], now)).toMatchObject({ state: 'out', inStock: true, usesLeft: 2 })
    expect(bagState(bag('R', DAY), [], now)).toMatchObject({ state: 'ready', list: 'ready', inStock: true, usesLeft: 3 })
  })

  it('lists every state in exactly one place', () => {
    expect(Object.keys(BAG_LIST_OF).sort()).toEqual(['awaiting-answers', 'compromised', 'discarded', 'expired', 'kept-out', 'maintenance-only', 'out', 'ready', 'to-store', 'used-up'])
  })
})

describe('targetTiming: late and medicated targets (policy: 60 minutes, medication flags; common practice)', () => {
  const collectedAt = new Date('2026-03-01T10:00:00Z')
  const target = (minutesAfter: number | null, medicationBefore: boolean | null = false) => ({
    kind: 'target' as const, collectedAt, medicationBefore,
    firstSymptomsAt: minutesAfter === null ? null : new Date(collectedAt.getTime() - minutesAfter * MIN),
  })

  it('exactly 60 minutes after the first symptoms is not late; 60 min 1 s is', () => {
    expect(DEFAULT_SAMPLE_POLICY.targetMaxMinutesAfterSymptoms).toBe(60) // common practice
    expect(targetTiming(target(60))).toMatchObject({ minutesAfterSymptoms: 60, late: false, flagged: false, reasons: [] })
    const late = targetTiming({ ...target(0), firstSymptomsAt: new Date(collectedAt.getTime() - 60 * MIN - 1000) })
    expect(late).toMatchObject({ minutesAfterSymptoms: 60, late: true, flagged: true })
    expect(late.reasons.map(r => r.rule)).toEqual(['target-late'])
    expect(targetTiming(target(95)).reasons[0]?.message).toBe('Collected 95 minutes after the first symptoms, later than the 60 minutes the protocol allows.')
  })

  it('medication before collecting flags it; not recorded does not; the policy can turn the medication flag off', () => {
    expect(targetTiming(target(10, true))).toMatchObject({ late: false, medicated: true, flagged: true })
    expect(targetTiming(target(10, null))).toMatchObject({ medicated: false, flagged: false })
    expect(targetTiming(target(95, true)).reasons.map(r => r.rule)).toEqual(['target-late', 'target-after-medication'])
    expect(targetTiming(target(10, true), { ...DEFAULT_SAMPLE_POLICY, flagMedicatedTargets: false }).flagged).toBe(false)
  })

  it('a control is never flagged, and a target without a symptoms time has no minutes', () => {
    expect(targetTiming({ kind: 'control', collectedAt, medicationBefore: true })).toEqual({ minutesAfterSymptoms: null, late: false, medicated: false, flagged: false, reasons: [] })
    expect(targetTiming(target(null))).toMatchObject({ minutesAfterSymptoms: null, late: false })
  })

  it('kept out by the trainer, a flagged target leaves the stock and the ready list', () => {
    const bags = [bag('OK', 10 * DAY), bag('LATE', 10 * DAY, { keptOut: true })]
    const f = stockForecast(bags, [], now).target
    expect(f).toMatchObject({ usableSamples: 1, usesLeft: 3 })
    expect(bagState(bags[1]!, [], now)).toMatchObject({ state: 'kept-out', list: 'not-for-training', usesLeft: 0 })
  })
})
