// Statistics for measuring a dog's reliability: the standard normal quantile, the Wilson score interval for a
// proportion, sample quantiles, and the scoring of discrimination trials (hits, misses, false alerts).
// Pure functions: no database, no HTTP, no framework imports.

/** A proportion with its two-sided confidence interval, all on the 0..1 scale. */
export interface ProportionInterval {
  estimate: number
  lower: number
  upper: number
}

// ---------------------------------------------------------------------------------------------------------------
// Standard normal quantile
// ---------------------------------------------------------------------------------------------------------------

/* eslint-disable no-loss-of-precision -- the coefficients below are written digit for digit as published, so they
   can be checked against the source; the parser rounds each to the nearest double, which is all the routine needs. */
// Coefficients of Wichura, M. J. (1988), "Algorithm AS 241: The Percentage Points of the Normal Distribution",
// Applied Statistics 37(3):477-484, routine PPND16 (about 16 significant digits). Constant term first.
const AS241_A = [
  3.387132872796366608, 133.14166789178437745, 1971.5909503065514427, 13731.693765509461125,
  45921.953931549871457, 67265.770927008700853, 33430.575583588128105, 2509.0809287301226727,
]
const AS241_B = [
  1, 42.313330701600911252, 687.1870074920579083, 5394.1960214247511077, 21213.794301586595867,
  39307.89580009271061, 28729.085735721942674, 5226.495278852854561,
]
const AS241_C = [
  1.42343711074968357734, 4.6303378461565452959, 5.7694972214606914055, 3.64784832476320460504,
  1.27045825245236838258, 0.24178072517745061177, 0.0227238449892691845833, 7.7454501427834140764e-4,
]
const AS241_D = [
  1, 2.05319162663775882187, 1.6763848301838038494, 0.68976733498510000455, 0.14810397642748007459,
  0.0151986665636164571966, 5.475938084995344946e-4, 1.05075007164441684324e-9,
]
const AS241_E = [
  6.6579046435011037772, 5.4637849111641143699, 1.7848265399172913358, 0.29656057182850489123,
  0.026532189526576123093, 0.0012426609473880784386, 2.71155556874348757815e-5, 2.01033439929228813265e-7,
]
const AS241_F = [
  1, 0.59983220655588793769, 0.13692988092273580531, 0.0148753612908506148525, 7.868691311456132591e-4,
  1.8463183175100546818e-5, 1.4215117583164458887e-7, 2.04426310338993978564e-15,
]
/* eslint-enable no-loss-of-precision */

/** Evaluates c[0] + c[1] x + ... + c[n] x^n by Horner's rule. */
function horner(coefficients: readonly number[], x: number): number {
  let value = 0
  for (let i = coefficients.length - 1; i >= 0; i--) value = value * x + (coefficients[i] as number)
  return value
}

/**
 * The standard normal quantile (inverse cumulative distribution function): the z with P(Z ≤ z) = p.
 *
 * Wichura's AS 241 (PPND16, Applied Statistics 1988), accurate to about 1 part in 10^16 over 0 < p < 1.
 * Throws RangeError unless 0 < p < 1.
 */
export function normalQuantile(p: number): number {
  if (!Number.isFinite(p) || p <= 0 || p >= 1) {
    throw new RangeError(`normalQuantile: p must be a number strictly between 0 and 1 (got ${p}).`)
  }
  const q = p - 0.5
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q
    return (q * horner(AS241_A, r)) / horner(AS241_B, r)
  }
  let r = Math.sqrt(-Math.log(q < 0 ? p : 1 - p))
  let value: number
  if (r <= 5) {
    r -= 1.6
    value = horner(AS241_C, r) / horner(AS241_D, r)
  } else {
    r -= 5
    value = horner(AS241_E, r) / horner(AS241_F, r)
  }
  return q < 0 ? -value : value
}

// ---------------------------------------------------------------------------------------------------------------
// Wilson score interval
// ---------------------------------------------------------------------------------------------------------------

/**
 * Wilson score interval for a binomial proportion (Wilson, E. B. 1927, "Probable inference, the law of succession,
 * and statistical inference", JASA 22:209-212), written as in Newcombe, R. G. 1998, "Two-sided confidence
 * intervals for the single proportion: comparison of seven methods", Statistics in Medicine 17:857-872,
 * method 3 (score interval without continuity correction):
 *
 *   (2np + z² ± z·√(z² + 4npq)) / (2(n + z²)),  p = r/n, q = 1 - p, z = the (1 + confidence)/2 normal quantile.
 *
 * It stays inside 0..1 and behaves well for small n and for 0 or n successes, unlike the simple ±z·SE interval.
 * Returns null when trials is 0 (nothing measured). Throws RangeError for non-integer counts, successes outside
 * 0..trials, or a confidence not strictly between 0 and 1.
 */
export function wilsonInterval(successes: number, trials: number, confidence = 0.95): ProportionInterval | null {
  if (!Number.isInteger(trials) || trials < 0) {
    throw new RangeError(`wilsonInterval: trials must be a whole number of 0 or more (got ${trials}).`)
  }
  if (!Number.isInteger(successes) || successes < 0 || successes > trials) {
    throw new RangeError(
      `wilsonInterval: successes must be a whole number from 0 to trials (${trials}); got ${successes}.`,
    )
  }
  if (!Number.isFinite(confidence) || confidence <= 0 || confidence >= 1) {
    throw new RangeError(
      `wilsonInterval: confidence must be strictly between 0 and 1, e.g. 0.95 (got ${confidence}).`,
    )
  }
  if (trials === 0) return null

  const n = trials
  const p = successes / n
  const z = normalQuantile((1 + confidence) / 2)
  const z2 = z * z
  const centre = 2 * successes + z2
  const spread = z * Math.sqrt(z2 + 4 * successes * (1 - p))
  const denominator = 2 * (n + z2)
  // At r = 0 and r = n the bounds are exactly 0 and 1; set them so rounding cannot leave 1e-17 or 0.9999999.
  const lower = successes === 0 ? 0 : Math.max(0, (centre - spread) / denominator)
  const upper = successes === trials ? 1 : Math.min(1, (centre + spread) / denominator)
  return { estimate: p, lower, upper }
}

// ---------------------------------------------------------------------------------------------------------------
// Sample quantiles
// ---------------------------------------------------------------------------------------------------------------

function checkValues(values: readonly number[], caller: string): void {
  values.forEach((value, index) => {
    if (!Number.isFinite(value)) {
      throw new RangeError(`${caller}: value at index ${index} is not a finite number (got ${value}).`)
    }
  })
}

/**
 * Sample quantile by linear interpolation between order statistics: definition 7 of Hyndman, R. J. & Fan, Y.
 * 1996, "Sample quantiles in statistical packages", The American Statistician 50(4):361-365, the default of R's
 * quantile(). With the values sorted as x[0] ≤ ... ≤ x[n-1], h = (n - 1)·p and
 *
 *   Q(p) = x[⌊h⌋] + (h - ⌊h⌋)·(x[⌊h⌋ + 1] - x[⌊h⌋]).
 *
 * Returns null for an empty list. Throws RangeError for a non-finite value or p outside 0..1. Does not change
 * the input array.
 */
export function quantile(values: readonly number[], p: number): number | null {
  if (!Number.isFinite(p) || p < 0 || p > 1) {
    throw new RangeError(`quantile: p must be between 0 and 1 inclusive (got ${p}).`)
  }
  checkValues(values, 'quantile')
  if (values.length === 0) return null
  const sorted = [...values].sort((a, b) => a - b)
  const h = (sorted.length - 1) * p
  const below = Math.floor(h)
  const lowerValue = sorted[below] as number
  if (below + 1 >= sorted.length) return lowerValue
  const upperValue = sorted[below + 1] as number
  return lowerValue + (h - below) * (upperValue - lowerValue)
}

/** The median (the type-7 quantile at p = 0.5, i.e. the usual middle value or mean of the two middle values). */
export function median(values: readonly number[]): number | null {
  return quantile(values, 0.5)
}

// ---------------------------------------------------------------------------------------------------------------
// Scoring discrimination trials
// ---------------------------------------------------------------------------------------------------------------

/**
 * One discrimination trial: a line-up of `stations` sample stations, at most one of which holds the target.
 * Stations are numbered from 1. `targetStation` null means a blank trial (controls only); `indicatedStation` null
 * means the dog gave no indication. `latencySeconds` is the time from release to the indication, when recorded.
 */
export interface Trial {
  stations: number
  targetStation: number | null
  indicatedStation: number | null
  latencySeconds?: number | null
}

export interface TrialCounts {
  trials: number
  targetPresent: number
  blank: number
  hits: number
  misses: number
  wrongStation: number
  falseAlerts: number
  correctRejections: number
}

export interface TrialScore {
  counts: TrialCounts
  sensitivity: ProportionInterval | null
  specificity: ProportionInterval | null
  /** 1 − specificity: false alerts on blank line-ups / blank line-ups (never over all trials). */
  falseAlertRate: ProportionInterval | null
  /** Median latency of hits that have a latency recorded; null when there is none. */
  medianLatencySeconds: number | null
}

function checkStation(value: number | null, stations: number, index: number, field: string): void {
  if (value === null) return
  if (!Number.isInteger(value) || value < 1 || value > stations) {
    throw new RangeError(
      `Trial ${index}: ${field} must be a station number from 1 to ${stations}, or empty (got ${value}).`,
    )
  }
}

/**
 * Scores a set of discrimination trials.
 *
 * Outcome classes follow signal detection theory (Green, D. M. & Swets, J. A. 1966, Signal Detection Theory and
 * Psychophysics, Wiley), extended to line-ups where the dog must also choose the right station:
 * - hit: target present and the dog indicated the target station;
 * - miss: target present and no indication;
 * - wrong station: target present and the dog indicated a station that is not the target. This is also counted
 *   as a false alert (the dog alerted on a control);
 * - false alert: an indication on a blank trial, or at a non-target station on a target trial;
 * - correct rejection: blank trial and no indication.
 * So on target trials hits + misses + wrongStation = targetPresent, and on blank trials
 * correctRejections + (false alerts on blanks) = blank.
 *
 * Rates, as diagnostic accuracy is usually reported (Altman, D. G. & Bland, J. M. 1994, "Diagnostic tests 1:
 * sensitivity and specificity", BMJ 308:1552):
 * - sensitivity = hits / target-present trials;
 * - specificity = correct rejections / blank trials;
 * - falseAlertRate = 1 − specificity = false alerts on blank trials / blank trials (the false-positive rate). It
 *   used to be all false alerts over all trials, which is neither 1 − specificity nor 1 − PPV and looks better than
 *   both; a wrong station on a target trial already lowers sensitivity and stays in counts.falseAlerts.
 * Each rate carries its Wilson interval at `confidence`; a rate whose denominator is 0 is null (never NaN).
 *
 * Throws RangeError naming the trial's index (from 0) when stations is not a whole number of 1 or more, when a
 * target or indicated station is outside 1..stations, or when a latency is negative or not finite.
 */
export function scoreTrials(trials: readonly Trial[], confidence = 0.95): TrialScore {
  const counts: TrialCounts = {
    trials: 0,
    targetPresent: 0,
    blank: 0,
    hits: 0,
    misses: 0,
    wrongStation: 0,
    falseAlerts: 0,
    correctRejections: 0,
  }
  const hitLatencies: number[] = []

  trials.forEach((trial, index) => {
    const { stations, targetStation, indicatedStation, latencySeconds } = trial
    if (!Number.isInteger(stations) || stations < 1) {
      throw new RangeError(`Trial ${index}: stations must be a whole number of 1 or more (got ${stations}).`)
    }
    checkStation(targetStation, stations, index, 'targetStation')
    checkStation(indicatedStation, stations, index, 'indicatedStation')
    if (latencySeconds !== undefined && latencySeconds !== null) {
      if (!Number.isFinite(latencySeconds) || latencySeconds < 0) {
        throw new RangeError(
          `Trial ${index}: latencySeconds must be 0 or more seconds, or empty (got ${latencySeconds}).`,
        )
      }
    }

    counts.trials++
    if (targetStation === null) {
      counts.blank++
      if (indicatedStation === null) counts.correctRejections++
      else counts.falseAlerts++
    } else {
      counts.targetPresent++
      if (indicatedStation === null) {
        counts.misses++
      } else if (indicatedStation === targetStation) {
        counts.hits++
        if (latencySeconds !== undefined && latencySeconds !== null) hitLatencies.push(latencySeconds)
      } else {
        counts.wrongStation++
        counts.falseAlerts++
      }
    }
  })

  return {
    counts,
    sensitivity: wilsonInterval(counts.hits, counts.targetPresent, confidence),
    specificity: wilsonInterval(counts.correctRejections, counts.blank, confidence),
    falseAlertRate: wilsonInterval(counts.blank - counts.correctRejections, counts.blank, confidence),
    medianLatencySeconds: median(hitLatencies),
  }
}
