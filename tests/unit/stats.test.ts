import { createRequire } from 'node:module'
import { describe, expect, it } from 'vitest'
import { median, normalQuantile, quantile, scoreTrials, wilsonInterval, type Trial } from '../../shared/utils/stats'

// jstat (devDependency, tests only) ships no type declarations; type the two functions the tests use.
interface JStatSubset {
  normal: { inv(p: number, mean: number, sd: number): number }
  quantiles(values: number[], ps: number[], alphap: number, betap: number): number[]
}
const { jStat } = createRequire(import.meta.url)('jstat') as { jStat: JStatSubset }

/**
 * Wilson interval computed independently of the module: the score interval is the set of p with
 * (p̂ - p)² ≤ z²·p(1 - p)/n, so its ends are the roots of (1 + z²/n)p² - (2p̂ + z²/n)p + p̂² = 0
 * (Wilson 1927), solved here with the quadratic formula and z from jStat.normal.inv.
 */
function independentWilson(successes: number, trials: number, confidence: number) {
  const z = jStat.normal.inv(1 - (1 - confidence) / 2, 0, 1)
  const pHat = successes / trials
  const a = 1 + (z * z) / trials
  const b = -(2 * pHat + (z * z) / trials)
  const c = pHat * pHat
  const root = Math.sqrt(Math.max(0, b * b - 4 * a * c))
  return { estimate: pHat, lower: (-b - root) / (2 * a), upper: (-b + root) / (2 * a) }
}

describe('normalQuantile', () => {
  it('agrees with jStat.normal.inv for the two-sided z at 90%, 95% and 99%', () => {
    for (const confidence of [0.9, 0.95, 0.99]) {
      const p = (1 + confidence) / 2
      expect(normalQuantile(p)).toBeCloseTo(jStat.normal.inv(p, 0, 1), 13)
    }
  })

  it('gives the familiar table values 1.6449, 1.9600, 2.5758 (from memory)', () => {
    expect(normalQuantile(0.95)).toBeCloseTo(1.6449, 4)
    expect(normalQuantile(0.975)).toBeCloseTo(1.96, 4)
    expect(normalQuantile(0.995)).toBeCloseTo(2.5758, 4)
  })

  it('agrees with jStat.normal.inv across the central range, in all three AS 241 regions', () => {
    for (const p of [1e-6, 1e-4, 0.001, 0.01, 0.05, 0.0749, 0.0751, 0.2, 0.37, 0.5, 0.63, 0.8, 0.9251, 0.99, 0.9999]) {
      const expected = jStat.normal.inv(p, 0, 1)
      expect(Math.abs(normalQuantile(p) - expected)).toBeLessThan(1e-11 * Math.max(1, Math.abs(expected)))
    }
  })

  it('stays accurate far in the tails (where jstat itself loses accuracy)', () => {
    // Reference values computed with mpmath 1.3.0 at 40 digits, as the root of log Φ(z) = log p (written as computed;
    // the parser rounds them to doubles).
    /* eslint-disable no-loss-of-precision */
    const reference: Array<[number, number]> = [
      [1e-300, -37.047096299361199237],
      [1e-30, -11.464024688443615727],
      [1e-12, -7.0344838253011319298],
      [1e-6, -4.7534243088228989482],
    ]
    /* eslint-enable no-loss-of-precision */
    for (const [p, z] of reference) {
      expect(Math.abs(normalQuantile(p) - z) / Math.abs(z)).toBeLessThan(1e-14)
    }
  })

  it('is antisymmetric about one half', () => {
    for (const p of [0.001, 0.1, 0.3, 0.45]) {
      expect(normalQuantile(1 - p)).toBeCloseTo(-normalQuantile(p), 12)
    }
    expect(normalQuantile(0.5)).toBe(0)
  })

  it('rejects p outside (0, 1)', () => {
    for (const p of [0, 1, -0.1, 1.5, Number.NaN]) expect(() => normalQuantile(p)).toThrow(RangeError)
  })
})

describe('wilsonInterval', () => {
  // Newcombe 1998, Table I (from memory): Wilson score interval without continuity correction (method 3).
  // All four agree with the formula to 4 decimals.
  const newcombeTableI: Array<[number, number, number, number]> = [
    [81, 263, 0.2553, 0.3662],
    [15, 148, 0.0624, 0.1605],
    [0, 20, 0, 0.1611],
    [1, 29, 0.0061, 0.1718],
  ]
  it.each(newcombeTableI)('%i/%i gives %f to %f (Newcombe 1998, Table I (from memory))', (r, n, lower, upper) => {
    const interval = wilsonInterval(r, n)
    expect(interval).not.toBeNull()
    expect(interval?.estimate).toBe(r / n)
    expect(interval?.lower).toBeCloseTo(lower, 4)
    expect(interval?.upper).toBeCloseTo(upper, 4)
  })

  it('agrees with an independent quadratic-root computation across a grid and three confidence levels', () => {
    let checked = 0
    for (const confidence of [0.9, 0.95, 0.99]) {
      for (const trials of [1, 2, 3, 5, 7, 10, 13, 20, 29, 50, 100, 263, 1000]) {
        for (let successes = 0; successes <= trials; successes += Math.max(1, Math.floor(trials / 9))) {
          const ours = wilsonInterval(successes, trials, confidence)
          const theirs = independentWilson(successes, trials, confidence)
          expect(ours?.estimate).toBe(theirs.estimate)
          expect(Math.abs((ours?.lower ?? Number.NaN) - theirs.lower)).toBeLessThan(1e-9)
          expect(Math.abs((ours?.upper ?? Number.NaN) - theirs.upper)).toBeLessThan(1e-9)
          checked++
        }
      }
    }
    expect(checked).toBeGreaterThan(250)
  })

  it('is exactly 0 below at no successes and exactly 1 above at all successes', () => {
    expect(wilsonInterval(0, 7)?.lower).toBe(0)
    expect(wilsonInterval(7, 7)?.upper).toBe(1)
    expect(wilsonInterval(7, 7)?.lower).toBeCloseTo(1 - (wilsonInterval(0, 7)?.upper ?? 0), 12)
  })

  it('widens with confidence and narrows with more trials', () => {
    const at90 = wilsonInterval(8, 10, 0.9)
    const at99 = wilsonInterval(8, 10, 0.99)
    expect((at99?.upper ?? 0) - (at99?.lower ?? 0)).toBeGreaterThan((at90?.upper ?? 0) - (at90?.lower ?? 0))
    const few = wilsonInterval(8, 10)
    const many = wilsonInterval(80, 100)
    expect((many?.upper ?? 0) - (many?.lower ?? 0)).toBeLessThan((few?.upper ?? 0) - (few?.lower ?? 0))
  })

  it('returns null for zero trials', () => {
    expect(wilsonInterval(0, 0)).toBeNull()
  })

  it('rejects bad counts and confidence levels with a clear RangeError', () => {
    expect(() => wilsonInterval(3, 2)).toThrow(/successes must be a whole number from 0 to trials/)
    expect(() => wilsonInterval(-1, 2)).toThrow(RangeError)
    expect(() => wilsonInterval(1.5, 3)).toThrow(RangeError)
    expect(() => wilsonInterval(1, 2.5)).toThrow(/trials must be a whole number/)
    expect(() => wilsonInterval(1, -2)).toThrow(RangeError)
    expect(() => wilsonInterval(1, 2, 1)).toThrow(/confidence must be strictly between 0 and 1/)
    expect(() => wilsonInterval(1, 2, 0)).toThrow(RangeError)
    expect(() => wilsonInterval(1, 2, Number.NaN)).toThrow(RangeError)
    expect(() => wilsonInterval(0, 0, 95)).toThrow(RangeError)
  })
})

describe('quantile and median', () => {
  // Worked by hand from the type-7 definition: sorted 1 1 2 3 4 5 6 9, h = 7p.
  const values = [3, 1, 4, 1, 5, 9, 2, 6]

  it('interpolates between order statistics (Hyndman & Fan type 7)', () => {
    expect(quantile(values, 0)).toBe(1)
    expect(quantile(values, 0.25)).toBeCloseTo(1.75, 12) // h = 1.75: 1 + 0.75 × (2 - 1)
    expect(quantile(values, 0.5)).toBeCloseTo(3.5, 12) // h = 3.5: 3 + 0.5 × (4 - 3)
    expect(quantile(values, 0.9)).toBeCloseTo(6.9, 12) // h = 6.3: 6 + 0.3 × (9 - 6)
    expect(quantile(values, 1)).toBe(9)
    expect(median(values)).toBeCloseTo(3.5, 12)
    expect(median([7, 1, 3])).toBe(3)
    expect(median([42])).toBe(42)
  })

  it('agrees with jStat.quantiles using alphap = betap = 1 (type 7) on varied samples', () => {
    let seed = 12345
    const next = () => {
      seed = (seed * 1103515245 + 12345) % 2147483648 // a linear congruential generator, for repeatable samples
      return seed / 2147483648
    }
    for (let sample = 0; sample < 40; sample++) {
      const length = 2 + Math.floor(next() * 30)
      const data = Array.from({ length }, () => Math.round(next() * 1000) / 10)
      for (const p of [0.1, 0.25, 0.5, 0.75, 0.9, 0.99]) {
        expect(quantile(data, p)).toBeCloseTo(jStat.quantiles(data, [p], 1, 1)[0] as number, 10)
      }
    }
  })

  it('returns null for no values and does not reorder the input', () => {
    expect(quantile([], 0.5)).toBeNull()
    expect(median([])).toBeNull()
    const input = [3, 1, 2]
    quantile(input, 0.5)
    expect(input).toEqual([3, 1, 2])
  })

  it('rejects p outside 0..1 and non-finite values', () => {
    expect(() => quantile(values, 1.1)).toThrow(RangeError)
    expect(() => quantile(values, -0.1)).toThrow(RangeError)
    expect(() => quantile([1, Number.NaN], 0.5)).toThrow(/index 1/)
  })
})

describe('scoreTrials', () => {
  // Twelve hand-worked trials on five-station line-ups.
  const trials: Trial[] = [
    { stations: 5, targetStation: 2, indicatedStation: 2, latencySeconds: 4 }, //  0 hit
    { stations: 5, targetStation: 3, indicatedStation: 3, latencySeconds: 6 }, //  1 hit
    { stations: 5, targetStation: 1, indicatedStation: null }, //                  2 miss
    { stations: 5, targetStation: 4, indicatedStation: 2, latencySeconds: 3 }, //  3 wrong station (false alert)
    { stations: 5, targetStation: 5, indicatedStation: 5, latencySeconds: 10 }, // 4 hit
    { stations: 5, targetStation: null, indicatedStation: null }, //               5 correct rejection
    { stations: 5, targetStation: null, indicatedStation: null }, //               6 correct rejection
    { stations: 5, targetStation: null, indicatedStation: 3, latencySeconds: 2 }, // 7 false alert on a blank
    { stations: 5, targetStation: null, indicatedStation: null }, //               8 correct rejection
    { stations: 5, targetStation: 2, indicatedStation: 2, latencySeconds: null }, // 9 hit, latency not timed
    { stations: 5, targetStation: 1, indicatedStation: 1, latencySeconds: 8 }, // 10 hit
    { stations: 5, targetStation: null, indicatedStation: null }, //              11 correct rejection
  ]

  it('counts each outcome as worked by hand', () => {
    const score = scoreTrials(trials)
    expect(score.counts).toEqual({
      trials: 12,
      targetPresent: 7,
      blank: 5,
      hits: 5,
      misses: 1,
      wrongStation: 1,
      falseAlerts: 2,
      correctRejections: 4,
    })
  })

  it('gives sensitivity 5/7, specificity 4/5 and false-alert rate 1 − specificity = 1/5 with Wilson intervals', () => {
    const score = scoreTrials(trials)
    expect(score.sensitivity?.estimate).toBeCloseTo(5 / 7, 12)
    expect(score.specificity?.estimate).toBeCloseTo(4 / 5, 12)
    // One false alert on 5 blank line-ups (Altman & Bland 1994: 1 − specificity). It was 2/12 over all trials.
    expect(score.falseAlertRate?.estimate).toBeCloseTo(1 / 5, 12)
    // The Wilson interval is symmetric under r → n − r: the false-alert range mirrors specificity's.
    expect(score.falseAlertRate?.lower).toBeCloseTo(1 - score.specificity!.upper, 12)
    expect(score.falseAlertRate?.upper).toBeCloseTo(1 - score.specificity!.lower, 12)
    const sensitivity = independentWilson(5, 7, 0.95)
    expect(score.sensitivity?.lower).toBeCloseTo(sensitivity.lower, 9)
    expect(score.sensitivity?.upper).toBeCloseTo(sensitivity.upper, 9)
    const specificity = independentWilson(4, 5, 0.95)
    expect(score.specificity?.lower).toBeCloseTo(specificity.lower, 9)
    const at90 = scoreTrials(trials, 0.9)
    expect(at90.falseAlertRate?.upper).toBeCloseTo(independentWilson(1, 5, 0.9).upper, 9)
  })

  it('takes the median latency of timed hits only (4, 6, 8, 10 → 7)', () => {
    expect(scoreTrials(trials).medianLatencySeconds).toBe(7)
  })

  it('has no sensitivity when every trial is blank', () => {
    const allBlank = scoreTrials([
      { stations: 3, targetStation: null, indicatedStation: null },
      { stations: 3, targetStation: null, indicatedStation: 1 },
    ])
    expect(allBlank.sensitivity).toBeNull()
    expect(allBlank.specificity?.estimate).toBe(0.5)
    expect(allBlank.falseAlertRate?.estimate).toBe(0.5)
    expect(allBlank.medianLatencySeconds).toBeNull()
  })

  it('has no specificity when every trial holds the target', () => {
    const allTarget = scoreTrials([
      { stations: 3, targetStation: 1, indicatedStation: 1, latencySeconds: 5 },
      { stations: 3, targetStation: 2, indicatedStation: 3 },
      { stations: 3, targetStation: 3, indicatedStation: 3, latencySeconds: 9 },
    ])
    expect(allTarget.specificity).toBeNull()
    expect(allTarget.sensitivity?.estimate).toBeCloseTo(2 / 3, 12)
    // A wrong station lowers sensitivity; with no blank line-up there is no false-alert rate (1 − specificity).
    expect(allTarget.falseAlertRate).toBeNull()
    expect(allTarget.counts.falseAlerts).toBe(1)
    expect(allTarget.counts.wrongStation).toBe(1)
    expect(allTarget.medianLatencySeconds).toBe(7)
  })

  it('returns all-null rates, never NaN, for no trials', () => {
    const empty = scoreTrials([])
    expect(empty.counts.trials).toBe(0)
    expect(empty.sensitivity).toBeNull()
    expect(empty.specificity).toBeNull()
    expect(empty.falseAlertRate).toBeNull()
    expect(empty.medianLatencySeconds).toBeNull()
  })

  it('rejects stations outside the line-up, naming the trial', () => {
    const good: Trial = { stations: 4, targetStation: 1, indicatedStation: 1 }
    expect(() => scoreTrials([good, good, { stations: 4, targetStation: 2, indicatedStation: 5 }])).toThrow(
      /Trial 2: indicatedStation must be a station number from 1 to 4/,
    )
    expect(() => scoreTrials([{ stations: 4, targetStation: 0, indicatedStation: null }])).toThrow(
      /Trial 0: targetStation/,
    )
    expect(() => scoreTrials([good, { stations: 4, targetStation: 1.5, indicatedStation: null }])).toThrow(/Trial 1/)
    expect(() => scoreTrials([{ stations: 0, targetStation: null, indicatedStation: null }])).toThrow(
      /Trial 0: stations/,
    )
    expect(() => scoreTrials([{ stations: 3, targetStation: 1, indicatedStation: 1, latencySeconds: -2 }])).toThrow(
      /Trial 0: latencySeconds/,
    )
  })
})
