// The presentation kit: every date, time, number and count on a screen or in an e-mail goes through here, so one
// purpose always reads one way. Pure (Intl only), tested under several time zones (tests/unit/format.test.ts).
//
// Two kinds of "when":
// - a calendar day ('2026-07-13': a due date, a birthday, a programme start) is the same day for everyone; it is
//   formatted in UTC from its parts and never shifted by the viewer's offset;
// - an instant (a tapped alert, a sent message) is shown in a named time zone: the viewer's, or the business's.

/** The business's language for dates and numbers when its settings name none (a UK business: common practice). */
export const DEFAULT_LOCALE = 'en-GB'
/** The zone used when a person has none on record (the demo business's own; common practice for a UK business). */
export const DEFAULT_TIME_ZONE = 'Europe/London'

/** One style per purpose: `short` in tables and lists, `medium` where the year matters, `long` in sentences. */
export type DayStyle = 'short' | 'medium' | 'long' | 'weekday' | 'weekday-long'

const DAY_OPTIONS: Record<DayStyle, Intl.DateTimeFormatOptions> = {
  'short': { day: 'numeric', month: 'short' }, // 13 Jul
  'medium': { day: 'numeric', month: 'short', year: 'numeric' }, // 13 Jul 2026
  'long': { day: 'numeric', month: 'long', year: 'numeric' }, // 13 July 2026
  'weekday': { weekday: 'short', day: 'numeric', month: 'short' }, // Mon 13 Jul
  'weekday-long': { weekday: 'long', day: 'numeric', month: 'long' }, // Monday 13 July
}

const formatters = new Map<string, Intl.DateTimeFormat>()
function dateFormat(locale: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${locale}|${JSON.stringify(options)}`
  let f = formatters.get(key)
  if (!f) {
    f = new Intl.DateTimeFormat(locale, options)
    formatters.set(key, f)
  }
  return f
}

const DAY_RE = /^(\d{4})-(\d{2})-(\d{2})/

/** A calendar day ('2026-07-13', or the day part of a longer ISO string) as words; '—' when there is none. */
export function formatDay(day: string | null | undefined, style: DayStyle = 'medium', locale = DEFAULT_LOCALE): string {
  const m = day ? DAY_RE.exec(day) : null
  if (!m) return '—'
  const date = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])))
  return dateFormat(locale, { ...DAY_OPTIONS[style], timeZone: 'UTC' }).format(date)
}

/** A month ('2026-07') as 'Jul 26' (chart axes) or 'July 2026' (headings). */
export function formatMonth(month: string, style: 'short' | 'long' = 'long', locale = DEFAULT_LOCALE): string {
  const [y, m] = month.split('-').map(Number)
  const options: Intl.DateTimeFormatOptions = style === 'short' ? { month: 'short', year: '2-digit' } : { month: 'long', year: 'numeric' }
  return dateFormat(locale, { ...options, timeZone: 'UTC' }).format(new Date(Date.UTC(y!, (m ?? 1) - 1, 1)))
}

/** How an instant is shown: its time, its day, or both. */
export type InstantStyle = 'time' | 'day' | 'day-time' | 'medium' | 'weekday-time'

const INSTANT_OPTIONS: Record<InstantStyle, Intl.DateTimeFormatOptions> = {
  'time': { hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }, // 14:05
  'day': { day: 'numeric', month: 'short', year: 'numeric' }, // 13 Jul 2026
  'day-time': { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }, // 13 Jul, 14:05
  'medium': { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }, // 13 Jul 2026, 14:05
  'weekday-time': { weekday: 'short', day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }, // Mon 13 Jul, 14:05
}

/** An instant (Date, ISO string or epoch ms) in a named time zone; '—' when there is none or it is not a time. */
export function formatInstant(
  instant: Date | string | number | null | undefined,
  style: InstantStyle = 'medium',
  timeZone: string | null | undefined = DEFAULT_TIME_ZONE,
  locale = DEFAULT_LOCALE,
): string {
  if (instant === null || instant === undefined || instant === '') return '—'
  const date = instant instanceof Date ? instant : new Date(instant)
  if (Number.isNaN(date.getTime())) return '—'
  return dateFormat(locale, { ...INSTANT_OPTIONS[style], timeZone: timeZone || DEFAULT_TIME_ZONE }).format(date)
}

/** A number with the locale's grouping ('12,480'); fractions only when asked. */
export function formatNumber(n: number, maximumFractionDigits = 0, locale = DEFAULT_LOCALE): string {
  return new Intl.NumberFormat(locale, { maximumFractionDigits }).format(n)
}

/** A share (0.834) as a whole percentage ('83 %' in en-GB style with a narrow space kept readable). */
export function formatPercent(share: number, locale = DEFAULT_LOCALE): string {
  return new Intl.NumberFormat(locale, { style: 'percent', maximumFractionDigits: 0 }).format(share)
}

const pluralRules = new Map<string, Intl.PluralRules>()
/**
 * A count with its noun in the right form through Intl.PluralRules: countOf(1, 'client') → '1 client',
 * countOf(3, 'client') → '3 clients', countOf(2, 'entry', 'entries') → '2 entries'.
 */
export function countOf(n: number, one: string, other = `${one}s`, locale = DEFAULT_LOCALE): string {
  let rules = pluralRules.get(locale)
  if (!rules) {
    rules = new Intl.PluralRules(locale)
    pluralRules.set(locale, rules)
  }
  return `${formatNumber(n, 2, locale)} ${rules.select(n) === 'one' ? one : other}`
}

/** An event key from the activity log ('video_uploaded') as a sentence when no wording is known ('Video uploaded'). */
export function eventSentence(key: string): string {
  const words = key.replace(/[._-]+/g, ' ').trim()
  return words ? words[0]!.toUpperCase() + words.slice(1) : ''
}
