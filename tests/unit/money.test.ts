// Money in integer minor units. Where a figure comes from outside it is marked beside it; every other figure is
// our own arithmetic, worked out in the comment next to it.
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { describe, expect, it } from 'vitest'
import {
  formatMoney,
  invoiceTotals,
  lineTotals,
  minorUnits,
  parseMoney,
  splitInstalments,
} from '../../shared/utils/money'

// UK VAT rates in basis points: standard 20 %, reduced 5 % (HMRC, "VAT rates" on GOV.UK, from memory); 17.5 % was
// the UK standard rate before January 2011 (from memory), used here only because it produces half-pennies.
const UK_STANDARD = 2000
const UK_REDUCED = 500
const OLD_UK_STANDARD = 1750

const nbsp = (s: string): string => s.replace(/\u00a0|\u202f/g, ' ')

describe('minorUnits', () => {
  it('gives the ISO 4217 minor units (ISO 4217, from memory: GBP 2, EUR 2, JPY 0, BHD 3)', () => {
    expect(minorUnits('GBP')).toBe(2)
    expect(minorUnits('EUR')).toBe(2)
    expect(minorUnits('JPY')).toBe(0)
    expect(minorUnits('BHD')).toBe(3)
    expect(minorUnits('gbp')).toBe(2) // Stripe writes codes in lower case
  })

  it('throws RangeError for unknown or malformed codes', () => {
    for (const bad of ['ZZZ', 'GB', 'GBPX', '', '12A', 'US$']) expect(() => minorUnits(bad)).toThrow(RangeError)
  })

  it('agrees with the ISO 4217 list shipped in currency-codes, and refuses codes whose minor unit is N.A.', () => {
    // Source: ISO 4217 list one (iso-4217-list-one.xml in the currency-codes package).
    const require = createRequire(import.meta.url)
    const xml = readFileSync(require.resolve('currency-codes/iso-4217-list-one.xml'), 'utf8')
    const entries = [...xml.matchAll(/<Ccy>([A-Z]{3})<\/Ccy>[\s\S]*?<CcyMnrUnts>([^<]+)<\/CcyMnrUnts>/g)].map((m) => ({
      code: m[1] ?? '',
      units: m[2] ?? '',
    }))
    expect(entries.length).toBeGreaterThan(150)
    const notMoney = new Set(entries.filter((e) => e.units === 'N.A.').map((e) => e.code))
    expect(notMoney.has('XAU')).toBe(true) // gold (ISO 4217: minor unit N.A.)
    for (const e of entries) {
      if (notMoney.has(e.code)) expect(() => minorUnits(e.code)).toThrow(RangeError)
      else expect(minorUnits(e.code), e.code).toBe(Number(e.units))
    }
  })
})

describe('splitInstalments', () => {
  it('splits 100001 into 12: 12 × 8333 = 99996, remainder 5 goes on the first five', () => {
    const parts = splitInstalments(100001, 12)
    expect(parts).toEqual([8334, 8334, 8334, 8334, 8334, 8333, 8333, 8333, 8333, 8333, 8333, 8333])
    expect(parts.reduce((a, b) => a + b, 0)).toBe(100001)
  })

  it('splits 0 into 3 and 5 into 7', () => {
    expect(splitInstalments(0, 3)).toEqual([0, 0, 0])
    expect(splitInstalments(5, 7)).toEqual([1, 1, 1, 1, 1, 0, 0])
    expect(splitInstalments(100, 3)).toEqual([34, 33, 33])
    expect(splitInstalments(42, 1)).toEqual([42])
  })

  it('always sums exactly, differs by at most 1, largest first', () => {
    let seed = 12345
    const next = () => {
      seed = (seed * 1103515245 + 12345) % 2 ** 31
      return seed
    }
    for (let i = 0; i < 500; i++) {
      const total = next() % 10_000_000
      const count = 1 + (next() % 48)
      const parts = splitInstalments(total, count)
      expect(parts).toHaveLength(count)
      expect(parts.reduce((a, b) => a + b, 0)).toBe(total)
      expect(Math.max(...parts) - Math.min(...parts)).toBeLessThanOrEqual(1)
      expect([...parts].sort((a, b) => b - a)).toEqual(parts)
    }
    const big = splitInstalments(Number.MAX_SAFE_INTEGER, 7)
    expect(big.reduce((a, b) => BigInt(a) + BigInt(b), 0n)).toBe(BigInt(Number.MAX_SAFE_INTEGER))
  })

  it('refuses bad input', () => {
    expect(() => splitInstalments(-1, 3)).toThrow(RangeError)
    expect(() => splitInstalments(10.5, 3)).toThrow(RangeError)
    expect(() => splitInstalments(Number.NaN, 3)).toThrow(RangeError)
    expect(() => splitInstalments(2 ** 53, 3)).toThrow(RangeError)
    expect(() => splitInstalments(10, 0)).toThrow(RangeError)
    expect(() => splitInstalments(10, 1.5)).toThrow(RangeError)
  })
})

describe('lineTotals: tax rounded per line to the nearest minor unit, halves away from zero', () => {
  // The rule: HMRC VAT Notice 700 (The VAT Guide), paragraph 17.5, lets VAT worked out per line be rounded to the
  // nearer 1p (from memory; the paragraph number is as HMRC's internal manual VATREC12010 gives it). The figures
  // below are all our own arithmetic, not examples from the guidance.
  //
  // At 20 % a half-penny cannot arise from whole pence: net × 0.2 always ends in .0, .2, .4, .6 or .8p (so "£0.125
  // net" is not a possible input: nets are whole pence). Halves arise at 5 % and at 17.5 %, tested below.

  it('20 %: 1243p → 248.6p → 249p; 1242p → 248.4p → 248p (own arithmetic)', () => {
    expect(lineTotals({ unitMinor: 1243, quantity: 1, taxRateBasisPoints: UK_STANDARD })).toEqual({
      netMinor: 1243,
      taxMinor: 249,
      grossMinor: 1492,
    })
    expect(lineTotals({ unitMinor: 1242, quantity: 1, taxRateBasisPoints: UK_STANDARD })).toEqual({
      netMinor: 1242,
      taxMinor: 248,
      grossMinor: 1490,
    })
    // 3 × 417p = 1251p; × 20 % = 250.2p → 250p.
    expect(lineTotals({ unitMinor: 417, quantity: 3, taxRateBasisPoints: UK_STANDARD })).toEqual({
      netMinor: 1251,
      taxMinor: 250,
      grossMinor: 1501,
    })
    // £4,500.00 programme fee at 20 % = £900.00 exactly.
    expect(lineTotals({ unitMinor: 450_000, quantity: 1, taxRateBasisPoints: UK_STANDARD }).taxMinor).toBe(90_000)
  })

  it('5 %: half-pennies round up: 10p → 0.5p → 1p; 30p → 1.5p → 2p; 1030p → 51.5p → 52p (own arithmetic)', () => {
    expect(lineTotals({ unitMinor: 10, quantity: 1, taxRateBasisPoints: UK_REDUCED }).taxMinor).toBe(1)
    expect(lineTotals({ unitMinor: 30, quantity: 1, taxRateBasisPoints: UK_REDUCED }).taxMinor).toBe(2)
    expect(lineTotals({ unitMinor: 1030, quantity: 1, taxRateBasisPoints: UK_REDUCED }).taxMinor).toBe(52)
    // Just below a half: 9p → 0.45p → 0p; 29p → 1.45p → 1p.
    expect(lineTotals({ unitMinor: 9, quantity: 1, taxRateBasisPoints: UK_REDUCED }).taxMinor).toBe(0)
    expect(lineTotals({ unitMinor: 29, quantity: 1, taxRateBasisPoints: UK_REDUCED }).taxMinor).toBe(1)
  })

  it('17.5 %: 20p → 3.5p → 4p; 2p → 0.35p → 0p; 60p → 10.5p → 11p (own arithmetic)', () => {
    expect(lineTotals({ unitMinor: 20, quantity: 1, taxRateBasisPoints: OLD_UK_STANDARD }).taxMinor).toBe(4)
    expect(lineTotals({ unitMinor: 2, quantity: 1, taxRateBasisPoints: OLD_UK_STANDARD }).taxMinor).toBe(0)
    expect(lineTotals({ unitMinor: 20, quantity: 3, taxRateBasisPoints: OLD_UK_STANDARD }).taxMinor).toBe(11)
  })

  it('credit lines mirror the line they credit: −10p at 5 % → −0.5p → −1p (own arithmetic)', () => {
    expect(lineTotals({ unitMinor: -10, quantity: 1, taxRateBasisPoints: UK_REDUCED })).toEqual({
      netMinor: -10,
      taxMinor: -1,
      grossMinor: -11,
    })
    expect(lineTotals({ unitMinor: -1030, quantity: 1, taxRateBasisPoints: UK_REDUCED }).taxMinor).toBe(-52)
    expect(lineTotals({ unitMinor: -1243, quantity: 1, taxRateBasisPoints: UK_STANDARD }).taxMinor).toBe(-249)
  })

  it('zero rate and zero quantity', () => {
    expect(lineTotals({ unitMinor: 1999, quantity: 2, taxRateBasisPoints: 0 })).toEqual({
      netMinor: 3998,
      taxMinor: 0,
      grossMinor: 3998,
    })
    expect(lineTotals({ unitMinor: 1999, quantity: 0, taxRateBasisPoints: UK_STANDARD }).grossMinor).toBe(0)
  })

  it('stays exact where floating point would not: 2^53−1 at 0 % and large nets at 20 %', () => {
    // 1501199875790165 × 2000 is beyond 2^53, so floats would lose digits; 1501199875790165 ÷ 5 = 300239975158033.
    expect(lineTotals({ unitMinor: 1501199875790165, quantity: 1, taxRateBasisPoints: UK_STANDARD }).taxMinor).toBe(
      300239975158033,
    )
  })

  it('refuses bad input with RangeError', () => {
    const ok = { unitMinor: 100, quantity: 1, taxRateBasisPoints: UK_STANDARD }
    expect(() => lineTotals({ ...ok, unitMinor: 10.5 })).toThrow(RangeError)
    expect(() => lineTotals({ ...ok, quantity: -1 })).toThrow(RangeError)
    expect(() => lineTotals({ ...ok, quantity: 1.5 })).toThrow(RangeError)
    expect(() => lineTotals({ ...ok, taxRateBasisPoints: 20.5 })).toThrow(RangeError)
    expect(() => lineTotals({ ...ok, taxRateBasisPoints: -1 })).toThrow(RangeError)
    expect(() => lineTotals({ ...ok, taxRateBasisPoints: 10_001 })).toThrow(RangeError)
    expect(() => lineTotals({ ...ok, unitMinor: Number.MAX_SAFE_INTEGER, quantity: 2 })).toThrow(RangeError)
  })
})

describe('invoiceTotals', () => {
  it('adds rounded lines; never re-rounds the sum (own arithmetic)', () => {
    // Three 10p lines at 5 %: each 0.5p → 1p, total tax 3p. Taxing the 30p sum instead would give 1.5p → 2p.
    const t = invoiceTotals([
      { unitMinor: 10, quantity: 1, taxRateBasisPoints: UK_REDUCED },
      { unitMinor: 10, quantity: 1, taxRateBasisPoints: UK_REDUCED },
      { unitMinor: 10, quantity: 1, taxRateBasisPoints: UK_REDUCED },
    ])
    expect(t).toMatchObject({ netMinor: 30, taxMinor: 3, grossMinor: 33 })
    expect(t.lines).toHaveLength(3)
  })

  it('sums mixed rates and gives a per-rate summary (own arithmetic)', () => {
    // 450000 at 20 % → 90000; 2 × 1243 = 2486 at 20 % → 497.2 → 497; 1030 at 5 % → 51.5 → 52; 2500 at 0 % → 0.
    // net 450000 + 2486 + 1030 + 2500 = 456016; tax 90000 + 497 + 52 = 90549; gross 546565.
    const t = invoiceTotals([
      { unitMinor: 450_000, quantity: 1, taxRateBasisPoints: UK_STANDARD },
      { unitMinor: 1243, quantity: 2, taxRateBasisPoints: UK_STANDARD },
      { unitMinor: 1030, quantity: 1, taxRateBasisPoints: UK_REDUCED },
      { unitMinor: 2500, quantity: 1, taxRateBasisPoints: 0 },
    ])
    expect(t).toMatchObject({ netMinor: 456016, taxMinor: 90549, grossMinor: 546565 })
    expect(t.byRate).toEqual([
      { taxRateBasisPoints: 0, netMinor: 2500, taxMinor: 0 },
      { taxRateBasisPoints: UK_REDUCED, netMinor: 1030, taxMinor: 52 },
      { taxRateBasisPoints: UK_STANDARD, netMinor: 452486, taxMinor: 90497 },
    ])
  })

  it('an empty invoice is zero', () => {
    expect(invoiceTotals([])).toEqual({ lines: [], netMinor: 0, taxMinor: 0, grossMinor: 0, byRate: [] })
  })
})

describe('formatMoney', () => {
  // Expected strings follow the Unicode CLDR locale data shipped in Node's ICU (from memory of CLDR's en-GB and
  // de-DE formats); the non-breaking spaces CLDR uses are shown here as plain spaces.
  it('en-GB GBP: £1,234.50', () => {
    expect(formatMoney(123450, 'GBP')).toBe('£1,234.50')
    expect(formatMoney(5, 'GBP')).toBe('£0.05')
    expect(formatMoney(0, 'GBP')).toBe('£0.00')
    expect(formatMoney(-123450, 'GBP', 'en-GB')).toBe('-£1,234.50')
  })

  it('JPY has no decimals; BHD has three; EUR in de-DE', () => {
    expect(formatMoney(1234, 'JPY')).toBe('JP¥1,234')
    expect(formatMoney(1234, 'JPY', 'ja-JP')).toBe('￥1,234')
    expect(nbsp(formatMoney(1234, 'BHD'))).toBe('BHD 1.234')
    expect(nbsp(formatMoney(123450, 'EUR', 'de-DE'))).toBe('1.234,50 €')
  })

  it('is exact for the largest safe amount', () => {
    expect(formatMoney(Number.MAX_SAFE_INTEGER, 'GBP')).toBe('£90,071,992,547,409.91')
    expect(formatMoney(-Number.MAX_SAFE_INTEGER, 'BHD')).toMatch(/9,007,199,254,740\.991$/)
  })

  it('refuses fractions of a minor unit and unknown currencies', () => {
    expect(() => formatMoney(12.5, 'GBP')).toThrow(RangeError)
    expect(() => formatMoney(100, 'ZZZ')).toThrow(RangeError)
  })
})

describe('parseMoney', () => {
  it('reads amounts into minor units', () => {
    expect(parseMoney('1,234.50', 'GBP')).toBe(123450)
    expect(parseMoney('1234.5', 'GBP')).toBe(123450)
    expect(parseMoney(' 12 ', 'GBP')).toBe(1200)
    expect(parseMoney('0.01', 'GBP')).toBe(1)
    expect(parseMoney('12.340', 'GBP')).toBe(1234) // trailing zeros are not fractions of a penny
    expect(parseMoney('1500', 'JPY')).toBe(1500)
    expect(parseMoney('1,500', 'JPY')).toBe(1500)
    expect(parseMoney('1.234', 'BHD')).toBe(1234)
    expect(parseMoney('0.001', 'BHD')).toBe(1)
    expect(parseMoney('0', 'EUR')).toBe(0)
  })

  it('round-trips with the amount part of formatMoney', () => {
    for (const minor of [0, 1, 99, 100, 123450, 987654321]) {
      expect(parseMoney(formatMoney(minor, 'GBP').replace('£', ''), 'GBP')).toBe(minor)
    }
  })

  it('refuses fractional minor units, negatives and garbage with RangeError', () => {
    expect(() => parseMoney('12.345', 'GBP')).toThrow(/2 decimal places/)
    expect(() => parseMoney('12.5', 'JPY')).toThrow(/no decimal places/)
    expect(() => parseMoney('1.2345', 'BHD')).toThrow(/3 decimal places/)
    expect(() => parseMoney('-5', 'GBP')).toThrow(/negative/)
    for (const bad of ['', '   ', 'abc', '£12', '12.', '.5', '1e3', '1,23', '12,3456', '+5', '1 000', '0x10', '12.5.0']) {
      expect(() => parseMoney(bad, 'GBP'), bad).toThrow(RangeError)
    }
    expect(() => parseMoney('99999999999999999', 'GBP')).toThrow(RangeError)
    expect(() => parseMoney('12', 'ZZZ')).toThrow(RangeError)
  })
})
