/// <reference lib="es2023.intl" />
// Money: every amount is an integer count of the currency's minor unit (pence for GBP, yen for JPY, fils for BHD).
// No floating point touches an amount: arithmetic is done in BigInt and checked back into safe integers.
//
// Tax is charged per invoice line and rounded to the nearest minor unit, halves away from zero (0.5p → 1p,
// −0.5p → −1p). HMRC VAT Notice 700 (The VAT Guide), paragraph 17.5, allows VAT worked out per line to be rounded
// to the nearer 1p (from memory; paragraph number as given in HMRC's internal manual VATREC12010). Rounding halves
// away from zero keeps a credit line the exact mirror of the line it credits.

import { code as currencyRecord } from 'currency-codes'
// BigInt constants without literals, which the browser build target (es2019) does not allow.
const ZERO = BigInt(0)
const ONE = BigInt(1)
const TWO = BigInt(2)
const TEN = BigInt(10)


/**
 * ISO 4217 codes whose minor unit is "N.A." (precious metals, bond-market units, SDR, testing and "no currency"):
 * they are not money we invoice in. Source: ISO 4217 list one, published 2024-06-25, as shipped in the
 * currency-codes package (iso-4217-list-one.xml), which records their digits as 0.
 */
const NOT_MONEY = new Set([
  'XAG', 'XAU', 'XBA', 'XBB', 'XBC', 'XBD', 'XDR', 'XPD', 'XPT', 'XSU', 'XTS', 'XUA', 'XXX',
])

function normaliseCurrency(currency: string): string {
  if (typeof currency !== 'string' || !/^[A-Za-z]{3}$/.test(currency.trim())) {
    throw new RangeError(`"${String(currency)}" is not a currency code. Use a three-letter ISO 4217 code such as GBP.`)
  }
  return currency.trim().toUpperCase()
}

/** Digits after the decimal point for an ISO 4217 currency (GBP 2, JPY 0, BHD 3). Case-insensitive. */
export function minorUnits(currency: string): number {
  const upper = normaliseCurrency(currency)
  const record = currencyRecord(upper)
  if (!record || NOT_MONEY.has(upper)) {
    throw new RangeError(`${upper} is not a currency Forescent can bill in. Use an ISO 4217 code such as GBP.`)
  }
  return record.digits
}

function assertSafeInteger(value: number, what: string): void {
  if (!Number.isSafeInteger(value)) throw new RangeError(`${what} must be a whole number of minor units.`)
}

function toSafe(value: bigint, what: string): number {
  if (value > BigInt(Number.MAX_SAFE_INTEGER) || value < BigInt(Number.MIN_SAFE_INTEGER)) {
    throw new RangeError(`${what} is too large.`)
  }
  return Number(value)
}

/**
 * Split a total into `count` instalments that add up to it exactly, differing by at most one minor unit,
 * the larger ones first: 100 into 3 → [34, 33, 33].
 */
export function splitInstalments(totalMinor: number, count: number): number[] {
  assertSafeInteger(totalMinor, 'The total')
  if (totalMinor < 0) throw new RangeError('The total cannot be negative.')
  if (!Number.isSafeInteger(count) || count < 1) {
    throw new RangeError('The number of instalments must be a whole number of at least 1.')
  }
  const base = Math.floor(totalMinor / count)
  const extra = totalMinor - base * count
  return Array.from({ length: count }, (_, i) => (i < extra ? base + 1 : base))
}

/** a / b rounded to the nearest integer, halves away from zero. b > 0. */
function divRoundHalfAway(a: bigint, b: bigint): bigint {
  const q = a / b // truncates toward zero
  const r = a % b // same sign as a
  const twice = (r < ZERO ? -r : r) * TWO
  if (twice >= b) return a < ZERO ? q - ONE : q + ONE
  return q
}

export const BASIS_POINTS_PER_WHOLE = 10_000 // 1 basis point = 0.01 %, so 20 % = 2000

export interface LineInput {
  /** Price of one unit in minor units, before tax. Negative for a discount or credit line. */
  unitMinor: number
  /** Whole units (sessions, visits, kits). Bill part-hours by choosing a smaller unit. */
  quantity: number
  /** Tax rate in basis points: 20 % = 2000, 5 % = 500, 0 % = 0. At most 100 %. */
  taxRateBasisPoints: number
  /**
   * The line's tax when a plan distributed it (see allocateTax in ./fee-plan): the exact tax rounded down or up,
   * never further. Left out, the tax is the exact tax rounded to the nearest minor unit, halves away from zero.
   */
  allocatedTaxMinor?: number
}

export interface LineTotals {
  netMinor: number
  taxMinor: number
  grossMinor: number
}

/** a / b rounded down (toward −∞). b > 0. */
function divFloor(a: bigint, b: bigint): bigint {
  const q = a / b
  return a % b !== ZERO && a < ZERO ? q - ONE : q
}

/**
 * One line's net, tax (rounded per line, halves away from zero; or the allocated tax, which must be the exact tax
 * rounded down or up) and gross, all in minor units.
 */
export function lineTotals(line: LineInput): LineTotals {
  assertSafeInteger(line.unitMinor, 'The unit price')
  if (!Number.isSafeInteger(line.quantity) || line.quantity < 0) {
    throw new RangeError('The quantity must be a whole number, 0 or more.')
  }
  const bp = line.taxRateBasisPoints
  if (!Number.isSafeInteger(bp) || bp < 0 || bp > BASIS_POINTS_PER_WHOLE) {
    throw new RangeError('The tax rate must be whole basis points from 0 to 10000 (0 % to 100 %).')
  }
  const net = BigInt(line.unitMinor) * BigInt(line.quantity)
  let tax = divRoundHalfAway(net * BigInt(bp), BigInt(BASIS_POINTS_PER_WHOLE))
  if (line.allocatedTaxMinor !== undefined) {
    assertSafeInteger(line.allocatedTaxMinor, 'The allocated tax')
    const down = divFloor(net * BigInt(bp), BigInt(BASIS_POINTS_PER_WHOLE))
    const up = -divFloor(-net * BigInt(bp), BigInt(BASIS_POINTS_PER_WHOLE))
    const allocated = BigInt(line.allocatedTaxMinor)
    if (allocated < down || allocated > up) {
      throw new RangeError('The allocated tax must be the line\'s exact tax rounded down or up.')
    }
    tax = allocated
  }
  return {
    netMinor: toSafe(net, 'The line net amount'),
    taxMinor: toSafe(tax, 'The line tax'),
    grossMinor: toSafe(net + tax, 'The line gross amount'),
  }
}

export interface InvoiceTotals extends LineTotals {
  lines: LineTotals[]
  /** Net and tax per tax rate, lowest rate first, for the VAT summary on the invoice. */
  byRate: Array<{ taxRateBasisPoints: number; netMinor: number; taxMinor: number }>
}

/** Sum of the per-line totals (tax is rounded per line, then added up; never recomputed on the sum). */
export function invoiceTotals(lines: readonly LineInput[]): InvoiceTotals {
  const perLine = lines.map(lineTotals)
  let net = ZERO
  let tax = ZERO
  const rates = new Map<number, { net: bigint; tax: bigint }>()
  perLine.forEach((l, i) => {
    net += BigInt(l.netMinor)
    tax += BigInt(l.taxMinor)
    const bp = lines[i]?.taxRateBasisPoints ?? 0
    const r = rates.get(bp) ?? { net: ZERO, tax: ZERO }
    r.net += BigInt(l.netMinor)
    r.tax += BigInt(l.taxMinor)
    rates.set(bp, r)
  })
  return {
    lines: perLine,
    netMinor: toSafe(net, 'The invoice net total'),
    taxMinor: toSafe(tax, 'The invoice tax total'),
    grossMinor: toSafe(net + tax, 'The invoice total'),
    byRate: [...rates.entries()]
      .sort(([a], [b]) => a - b)
      .map(([taxRateBasisPoints, r]) => ({
        taxRateBasisPoints,
        netMinor: toSafe(r.net, 'The net total at one rate'),
        taxMinor: toSafe(r.tax, 'The tax total at one rate'),
      })),
  }
}

/** Exact decimal text of a minor-unit amount: (123450, 2) → '1234.50'. */
function decimalText(minor: number, digits: number): `${number}` {
  const negative = minor < 0
  const abs = (negative ? -BigInt(minor) : BigInt(minor)).toString().padStart(digits + 1, '0')
  const whole = digits === 0 ? abs : abs.slice(0, -digits)
  const text = digits === 0 ? whole : `${whole}.${abs.slice(-digits)}`
  return `${negative ? '-' : ''}${text}` as `${number}`
}

/** Format minor units for people, with the currency's own number of decimals: (123450, 'GBP') → '£1,234.50'. */
export function formatMoney(minor: number, currency: string, locale = 'en-GB'): string {
  assertSafeInteger(minor, 'The amount')
  const upper = normaliseCurrency(currency)
  const digits = minorUnits(upper)
  const fmt = new Intl.NumberFormat(locale, {
    style: 'currency',
    currency: upper,
    minimumFractionDigits: digits,
    maximumFractionDigits: digits,
  })
  // A decimal string keeps every digit exact, even above 2^53 / 10^digits where a float would round.
  return fmt.format(decimalText(minor, digits))
}

/**
 * Read an amount typed by a person into minor units: '1,234.50' GBP → 123450, '500' JPY → 500.
 * Accepts digits with an optional '.' decimal part and optional ',' thousands separators in groups of three.
 * Refuses (RangeError) negatives, signs, symbols, letters, and more decimals than the currency has, unless the
 * extra digits are zeros ('12.340' GBP is 1234; '12.345' GBP is refused).
 */
export function parseMoney(input: string, currency: string): number {
  const digits = minorUnits(currency)
  const upper = normaliseCurrency(currency)
  const text = typeof input === 'string' ? input.trim() : ''
  if (text === '') throw new RangeError('Enter an amount.')
  if (/^-/.test(text)) throw new RangeError('The amount cannot be negative.')
  const m = /^(\d{1,3}(?:,\d{3})+|\d+)(?:\.(\d+))?$/.exec(text)
  if (!m) {
    const example = digits === 0 ? '1500' : `12.${'5'.padEnd(digits, '0')}`
    throw new RangeError(`"${text}" is not an amount. Enter digits only, like ${example}.`)
  }
  const whole = (m[1] ?? '0').replace(/,/g, '')
  const fraction = m[2] ?? ''
  const significant = fraction.replace(/0+$/, '')
  if (significant.length > digits) {
    throw new RangeError(
      digits === 0
        ? `${upper} has no decimal places. Enter a whole amount.`
        : `${upper} has ${digits} decimal places. Enter at most ${digits} digits after the point.`,
    )
  }
  const minor = BigInt(whole) * TEN ** BigInt(digits) + BigInt(significant.padEnd(digits, '0') || '0')
  return toSafe(minor, 'The amount')
}

/**
 * A tax rate typed as a percent into basis points: '20' → 2000, '5.5' → 550, '0' → 0. At most two decimals and at
 * most 100 %; RangeError with a message a person can act on otherwise.
 */
export function parsePercent(input: string): number {
  const text = typeof input === 'string' ? input.trim().replace(/\s*%$/, '') : ''
  const m = /^(\d{1,3})(?:\.(\d{1,2})0*)?$/.exec(text)
  if (!m) throw new RangeError('Enter the tax rate as a percent, like 20 or 5.5.')
  const bp = Number(m[1]) * 100 + Number((m[2] ?? '').padEnd(2, '0'))
  if (bp > BASIS_POINTS_PER_WHOLE) throw new RangeError('The tax rate is at most 100 %.')
  return bp
}

/** Basis points as a percent for people: 2000 → '20', 550 → '5.5'. */
export function percentText(basisPoints: number): string {
  return String(basisPoints / 100)
}

/** Minor units as the plain decimal a person would type back into a form: (60000, 'GBP') → '600.00'. */
export function amountText(minor: number, currency: string): string {
  assertSafeInteger(minor, 'The amount')
  return decimalText(minor, minorUnits(currency))
}
