import { describe, expect, it } from 'vitest'
import type { Trial } from '../../shared/utils/stats'
import { DEFAULT_CRITERIA, DEFAULT_PROGRAMME, evaluateReadiness, intervalInWords, loosenedCriteria, windowStart, type ReadinessCriteria, type SessionForReadiness } from '../../shared/utils/training'

const hit = (stations = 3): Trial => ({ stations, targetStation: 1, indicatedStation: 1 })
const miss = (): Trial => ({ stations: 3, targetStation: 2, indicatedStation: null })
const blankQuiet = (): Trial => ({ stations: 3, targetStation: null, indicatedStation: null })
const blankAlert = (): Trial => ({ stations: 3, targetStation: null, indicatedStation: 2 })
const times = (n: number, f: () => Trial) => Array.from({ length: n }, f)

const criteria: ReadinessCriteria = { ...DEFAULT_CRITERIA, windowDays: 30, minTrials: 40, minSessions: 4, minDays: 3, minBlindPercent: 50, minSensitivityLowerPercent: 80, minSpecificityLowerPercent: 80 }
const byKey = (r: ReturnType<typeof evaluateReadiness>) => Object.fromEntries(r.criteria.map(c => [c.key, c]))

describe('windowStart', () => {
  it('counts the window inclusive of today', () => {
    expect(windowStart('2026-03-31', 1)).toBe('2026-03-31')
    expect(windowStart('2026-03-31', 31)).toBe('2026-03-01')
  })
})

describe('evaluateReadiness', () => {
  it('with nothing logged, every criterion is unmet and says what is needed (no NaN)', () => {
    const r = evaluateReadiness(criteria, [], '2026-03-31')
    const c = byKey(r)
    expect(r.allMet).toBe(false)
    expect(c.trials!.stillNeeded).toBe('40 more trials')
    expect(c.sessions!.stillNeeded).toBe('4 more sessions')
    expect(c.sensitivity!.actual).toBe('No trials with a target yet')
    expect(JSON.stringify(r)).not.toContain('NaN')
  })

  it('meets every criterion with enough blind, accurate trials over enough days', () => {
    // 4 sessions on 4 days, 3 of them blind, each 10 hits and 5 quiet blanks: 60 trials, 40 hits, 20 blanks.
    const sessions: SessionForReadiness[] = ['2026-03-10', '2026-03-15', '2026-03-20', '2026-03-25'].map((day, i) => ({ day, blind: i > 0, trials: [...times(10, hit), ...times(5, blankQuiet)] }))
    const r = evaluateReadiness(criteria, sessions, '2026-03-31')
    expect(r.allMet).toBe(true)
    // 40/40 hits: the Wilson lower bound is n/(n + z²) = 40/(40 + 1.959964²) = 0.9124 (closed form at r = n,
    // Newcombe 1998, method 3; from memory, recomputed by hand).
    expect(r.score.sensitivity!.lower).toBeCloseTo(40 / (40 + 1.959963984540054 ** 2), 10)
    // 20/20 quiet blanks: 20/(20 + z²) = 0.8389.
    expect(r.score.specificity!.lower).toBeCloseTo(0.8389, 4)
    expect(byKey(r).blind!.actual).toBe('45 blind trials of 60 (75%)')
  })

  it('says how many more blind trials are needed', () => {
    // 40 trials, 12 blind: half of 40 is 20, so 8 more blind trials.
    const sessions: SessionForReadiness[] = [
      { day: '2026-03-20', blind: true, trials: times(12, hit) },
      { day: '2026-03-21', blind: false, trials: times(28, hit) },
    ]
    const c = byKey(evaluateReadiness(criteria, sessions, '2026-03-31'))
    expect(c.blind!.met).toBe(false)
    expect(c.blind!.stillNeeded).toBe('8 more blind trials')
    expect(c.trials!.met).toBe(true)
    expect(c.days!.stillNeeded).toBe('Sessions on 1 more day')
  })

  it('ignores sessions outside the rolling window and sessions with no trials', () => {
    const sessions: SessionForReadiness[] = [
      { day: '2026-01-01', blind: true, trials: times(50, hit) },
      { day: '2026-03-30', blind: true, trials: [] },
      { day: '2026-03-31', blind: true, trials: times(3, hit) },
    ]
    const r = evaluateReadiness(criteria, sessions, '2026-03-31')
    expect(r.score.counts.trials).toBe(3)
    expect(byKey(r).sessions!.actual).toBe('1 session')
  })

  it('refuses sign-off on a dog that alerts on blanks, however many hits it has', () => {
    const sessions: SessionForReadiness[] = ['2026-03-10', '2026-03-15', '2026-03-20', '2026-03-25'].map(day => ({ day, blind: true, trials: [...times(10, hit), ...times(3, blankQuiet), ...times(2, blankAlert)] }))
    const c = byKey(evaluateReadiness(criteria, sessions, '2026-03-31'))
    expect(c.sensitivity!.met).toBe(true)
    expect(c.specificity!.met).toBe(false) // 12/20 quiet: 60%, lower bound about 38.7%
    expect(c.specificity!.stillNeeded).toMatch(/must reach 80%/)
  })

  it('a miss lowers sensitivity below a strict threshold', () => {
    const sessions: SessionForReadiness[] = [{ day: '2026-03-31', blind: true, trials: [...times(9, hit), miss()] }]
    const r = evaluateReadiness({ ...criteria, minTrials: 1, minSessions: 1, minDays: 1 }, sessions, '2026-03-31')
    // 9/10: Wilson 95% interval 0.5958–0.9821, from the score formula of Newcombe 1998 (method 3) worked by hand;
    // wilsonInterval itself is checked against published values and jStat in stats.test.ts.
    expect(r.score.sensitivity!.lower).toBeCloseTo(0.5958, 3)
    expect(byKey(r).sensitivity!.met).toBe(false)
  })
})

describe('evaluateReadiness after a sign-off', () => {
  const easy: ReadinessCriteria = { ...criteria, minTrials: 2, minSessions: 1, minDays: 1, minBlindPercent: 0, minSensitivityLowerPercent: 0, minSpecificityLowerPercent: 0 }
  const signOff = { at: new Date('2026-06-20T12:00:00Z'), day: '2026-06-20' }
  const before: SessionForReadiness = { day: '2026-06-19', blind: false, trials: [hit(), hit()], createdAt: new Date('2026-06-19T10:00:00Z') }
  const sameDayBefore: SessionForReadiness = { day: '2026-06-20', blind: false, trials: [hit(), hit()], createdAt: new Date('2026-06-20T09:00:00Z') }
  const sameDayAfter: SessionForReadiness = { day: '2026-06-20', blind: false, trials: [hit(), blankQuiet()], createdAt: new Date('2026-06-20T15:00:00Z') }
  const backfilled: SessionForReadiness = { day: '2026-06-18', blind: false, trials: [hit(), hit()], createdAt: new Date('2026-06-25T10:00:00Z') }

  it('counts only sessions logged after the previous milestone was signed off, on or after its day', () => {
    const none = evaluateReadiness(easy, [before, sameDayBefore, backfilled], '2026-06-30', 0.95, signOff)
    expect(none.score.counts.trials).toBe(0)
    expect(none.allMet).toBe(false)
    expect(none.from).toBe('2026-06-20')
    expect(none.countedFromSignOff).toBe(true)
    const some = evaluateReadiness(easy, [before, sameDayBefore, sameDayAfter, backfilled], '2026-06-30', 0.95, signOff)
    expect(some.score.counts.trials).toBe(2)
    expect(some.allMet).toBe(true)
  })

  it('keeps the rolling window when the sign-off lies before it', () => {
    const r = evaluateReadiness(easy, [before], '2026-09-30', 0.95, signOff)
    expect(r.countedFromSignOff).toBe(false)
    expect(r.from).toBe(windowStart('2026-09-30', easy.windowDays))
  })
})

describe('loosenedCriteria', () => {
  it('lists criteria looser than the defaults, accepts stricter ones', () => {
    expect(loosenedCriteria(DEFAULT_CRITERIA, { ...DEFAULT_CRITERIA, minTrials: 60, windowDays: 30 })).toEqual([])
    expect(loosenedCriteria(DEFAULT_CRITERIA, { ...DEFAULT_CRITERIA, minTrials: 10, windowDays: 120 })).toEqual(['windowDays', 'minTrials'])
  })
})

describe('the default programme', () => {
  it('runs from intake to the yearly re-check, with the dog\'s reliability stages measured', () => {
    expect(DEFAULT_PROGRAMME.milestones[0]!.name).toBe('Intake and suitability')
    expect(DEFAULT_PROGRAMME.milestones.at(-1)!.name).toBe('Aftercare and yearly re-check')
    expect(DEFAULT_PROGRAMME.milestones.filter(m => m.measured).map(m => m.name)).toEqual(['Discrimination', 'Trained alert behaviour', 'Generalisation to new places and distractions'])
  })
  it('explains an interval in plain words', () => {
    expect(intervalInWords(null, 'blank trials')).toBe('Not measured yet: no blank trials.')
    expect(intervalInWords({ estimate: 0.9, lower: 0.5958, upper: 0.9821 }, 'x')).toBe('90% — with the trials so far, the true figure most likely lies between 59.6% and 98.2%.')
  })
})
