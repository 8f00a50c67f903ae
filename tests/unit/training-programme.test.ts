import { describe, expect, it } from 'vitest'
import { scoreTrials, type Trial } from '../../shared/utils/stats'
import {
  arrangeInsert, arrangeRemoval, arrangeReorder, DEFAULT_CRITERIA, dogReliability, evaluateReadiness, MAX_MILESTONES,
  positionChanges, readinessSummary, type ProgrammeSlot,
} from '../../shared/utils/training'

// Five milestones, the first two signed off.
const slots: ProgrammeSlot[] = [
  { id: 'a', position: 0, confirmed: true },
  { id: 'b', position: 1, confirmed: true },
  { id: 'c', position: 2, confirmed: false },
  { id: 'd', position: 3, confirmed: false },
  { id: 'e', position: 4, confirmed: false },
]
const order = (r: ReturnType<typeof arrangeInsert>) => (r.ok ? r.order : r)

describe('arrangeInsert', () => {
  it('puts the new milestone at the place asked, after the signed-off ones', () => {
    expect(order(arrangeInsert(slots, 2, 'n'))).toEqual(['a', 'b', 'n', 'c', 'd', 'e'])
    expect(order(arrangeInsert(slots, 5, 'n'))).toEqual(['a', 'b', 'c', 'd', 'e', 'n'])
    expect(order(arrangeInsert([], 0, 'n'))).toEqual(['n'])
  })
  it('refuses a place before a signed-off milestone or past the end', () => {
    expect(arrangeInsert(slots, 1, 'n')).toMatchObject({ ok: false, status: 422, field: 'position', message: 'Signed-off milestones stay first: put the new one at place 3 to 6.' })
    expect(arrangeInsert(slots, 6, 'n')).toMatchObject({ ok: false, status: 422 })
    expect(arrangeInsert(slots, 2.5, 'n')).toMatchObject({ ok: false })
  })
  it('refuses a programme past the limit', () => {
    const full = Array.from({ length: MAX_MILESTONES }, (_, i) => ({ id: `m${i}`, position: i, confirmed: false }))
    expect(arrangeInsert(full, 3, 'n')).toMatchObject({ ok: false, status: 422, message: `A programme has at most ${MAX_MILESTONES} milestones. Remove one first.` })
  })
})

describe('arrangeRemoval', () => {
  it('closes the gap', () => {
    expect(order(arrangeRemoval(slots, 'd'))).toEqual(['a', 'b', 'c', 'e'])
  })
  it('keeps signed-off milestones, the only milestone, and refuses an unknown one', () => {
    expect(arrangeRemoval(slots, 'a')).toMatchObject({ ok: false, status: 409 })
    expect(arrangeRemoval([{ id: 'x', position: 0, confirmed: false }], 'x')).toMatchObject({ ok: false, status: 422 })
    expect(arrangeRemoval(slots, 'zz')).toMatchObject({ ok: false, status: 422 })
  })
})

describe('arrangeReorder', () => {
  it('reorders the ones still to come behind the signed-off ones', () => {
    expect(order(arrangeReorder(slots, ['e', 'c', 'd']))).toEqual(['a', 'b', 'e', 'c', 'd'])
  })
  it('refuses signed-off ids, duplicates, and a list that misses or adds one', () => {
    expect(arrangeReorder(slots, ['a', 'c', 'd', 'e'])).toMatchObject({ ok: false, status: 409, message: expect.stringContaining('stay first') })
    expect(arrangeReorder(slots, ['c', 'c', 'd', 'e'])).toMatchObject({ ok: false, status: 422 })
    expect(arrangeReorder(slots, ['c', 'd'])).toMatchObject({ ok: false, status: 409, message: expect.stringContaining('Reload') })
    expect(arrangeReorder(slots, ['c', 'd', 'e', 'x'])).toMatchObject({ ok: false, status: 409 })
  })
})

describe('positionChanges', () => {
  it('lists only the rows that move, with their new place', () => {
    expect(positionChanges(slots, ['a', 'b', 'e', 'c', 'd'])).toEqual([['e', 2], ['c', 3], ['d', 4]])
    expect(positionChanges(slots, slots.map(s => s.id))).toEqual([])
    // After a removal the later ones move up by one.
    expect(positionChanges(slots.filter(s => s.id !== 'c'), ['a', 'b', 'd', 'e'])).toEqual([['d', 2], ['e', 3]])
  })
})

const hit: Trial = { stations: 3, targetStation: 1, indicatedStation: 1 }
const quiet: Trial = { stations: 3, targetStation: null, indicatedStation: null }
const falseAlert: Trial = { stations: 3, targetStation: null, indicatedStation: 2 }

describe('readinessSummary', () => {
  it('is unmeasured without readiness, ready when all criteria hold, else the first thing still needed', () => {
    expect(readinessSummary(null)).toEqual({ state: 'unmeasured', stillNeeded: null, unmet: 0 })
    const none = evaluateReadiness(DEFAULT_CRITERIA, [], '2026-06-30')
    expect(readinessSummary(none)).toMatchObject({ state: 'not yet', stillNeeded: '40 more trials', unmet: 6 })
    const easy = { ...DEFAULT_CRITERIA, minTrials: 2, minSessions: 1, minDays: 1, minBlindPercent: 0, minSensitivityLowerPercent: 0, minSpecificityLowerPercent: 0 }
    expect(readinessSummary(evaluateReadiness(easy, [{ day: '2026-06-29', blind: false, trials: [hit, quiet] }], '2026-06-30'))).toEqual({ state: 'ready', stillNeeded: null, unmet: 0 })
  })
})

describe('dogReliability', () => {
  const sessions = [
    { day: '2026-05-02', blind: false, stage: 'discrimination', trials: [hit, hit, quiet, falseAlert] },
    { day: '2026-05-01', blind: true, stage: 'imprinting', trials: [hit, hit] },
    { day: '2026-05-09', blind: true, stage: 'discrimination', trials: [hit, quiet, quiet] },
  ]
  it('scores all sessions, blind against not blind, and each stage in the order given', () => {
    const r = dogReliability(sessions, ['imprinting', 'discrimination', 'alert'])
    expect(r.overall).toEqual(scoreTrials(sessions.flatMap(s => s.trials)))
    expect(r.overall.counts).toMatchObject({ trials: 9, hits: 5, correctRejections: 3, falseAlerts: 1 })
    expect(r.blind.counts).toMatchObject({ trials: 5, hits: 3, correctRejections: 2, falseAlerts: 0 })
    expect(r.notBlind.counts).toMatchObject({ trials: 4, hits: 2, correctRejections: 1, falseAlerts: 1 })
    expect(r.byStage.map(s => [s.stage, s.sessions, s.score.counts.trials])).toEqual([['imprinting', 1, 2], ['discrimination', 2, 7]])
    expect(r).toMatchObject({ sessions: 3, firstDay: '2026-05-01', lastDay: '2026-05-09' })
  })
  it('gives no figures, not NaN, for a dog with no trials', () => {
    const r = dogReliability([])
    expect(r.overall.sensitivity).toBeNull()
    expect(r.byStage).toEqual([])
    expect(r.firstDay).toBeNull()
  })
})
