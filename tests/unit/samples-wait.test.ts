import { describe, expect, it } from 'vitest'
import { DEFAULT_SAMPLE_POLICY, collectionWait, waitText } from '../../shared/utils/samples'

// The checklist is answered before any roll goes in the mouth; a control sample then waits out the policy's limits
// (45 minutes after food, drink, teeth, gum, alcohol or smoking; 15 after water: the defaults, common practice).
const now = new Date('2026-05-04T09:00:00Z')
const ago = (m: number) => new Date(now.getTime() - m * 60_000)

describe('how long to wait before collecting', () => {
  it('food 20 minutes ago: wait 25 more minutes, ready at 9:25', () => {
    const w = collectionWait({ kind: 'control', answeredAt: now, exposures: { lastAteAt: ago(20) } })
    expect(w.minutes).toBe(25)
    expect(w.readyAt.toISOString()).toBe('2026-05-04T09:25:00.000Z')
    expect(w.reasons).toEqual([{ rule: 'fasting-food', what: 'eating', clearAt: new Date('2026-05-04T09:25:00Z') }])
    expect(waitText(w)).toBe('Wait 25 more minutes')
  })

  it('the longest wait counts, each reason listed, the last to clear first', () => {
    const w = collectionWait({ kind: 'control', answeredAt: now, exposures: { lastWaterAt: ago(5), lastDrankOtherThanWaterAt: ago(30), lastAteAt: ago(60), lastSmokedAt: null } })
    expect(w.minutes).toBe(15)
    expect(w.reasons.map(r => r.rule)).toEqual(['fasting-drink', 'water-free'])
    expect(w.reasons.map(r => r.clearAt.toISOString())).toEqual(['2026-05-04T09:15:00.000Z', '2026-05-04T09:10:00.000Z'])
  })

  it('exactly the limit is enough; a second short of it still waits a minute', () => {
    expect(collectionWait({ kind: 'control', answeredAt: now, exposures: { lastAteAt: ago(45) } }).minutes).toBe(0)
    const justShort = collectionWait({ kind: 'control', answeredAt: now, exposures: { lastAteAt: new Date(ago(45).getTime() + 1000) } })
    expect(justShort.minutes).toBe(1)
    expect(waitText(justShort)).toBe('Wait 1 more minute')
  })

  it('nothing recent: collect now', () => {
    const w = collectionWait({ kind: 'control', answeredAt: now, exposures: { lastAteAt: null, lastWaterAt: ago(90) } })
    expect(w).toEqual({ minutes: 0, readyAt: now, reasons: [] })
    expect(waitText(w)).toBeNull()
  })

  it('not sure counts as just now: waiting the whole limit makes it certain', () => {
    const w = collectionWait({ kind: 'control', answeredAt: now, exposures: {}, unknown: ['lastBrushedTeethAt', 'lastWaterAt'] })
    expect(w.minutes).toBe(45)
    expect(w.reasons.map(r => r.rule)).toEqual(['fasting-teeth', 'water-free'])
  })

  it('counts down from the moment of answering as time passes', () => {
    const answers = { kind: 'control' as const, answeredAt: now, exposures: { lastAteAt: ago(20) } }
    expect(collectionWait(answers, DEFAULT_SAMPLE_POLICY, new Date(now.getTime() + 10 * 60_000)).minutes).toBe(15)
    expect(collectionWait(answers, DEFAULT_SAMPLE_POLICY, new Date(now.getTime() + 25 * 60_000)).minutes).toBe(0)
  })

  it('follows the business policy', () => {
    const policy = { ...DEFAULT_SAMPLE_POLICY, fastingMinutes: 60, waterFreeMinutes: 30 }
    expect(collectionWait({ kind: 'control', answeredAt: now, exposures: { lastAteAt: ago(20), lastWaterAt: ago(1) } }, policy).minutes).toBe(40)
  })

  it('a target sample never waits: the episode will not', () => {
    const w = collectionWait({ kind: 'target', answeredAt: now, exposures: { lastAteAt: ago(1) }, unknown: ['lastWaterAt'] })
    expect(w).toEqual({ minutes: 0, readyAt: now, reasons: [] })
  })
})
