// The presentation kit (shared/utils/format.ts). Calendar days must read the same for every viewer, so the whole file
// runs under three process time zones: west of UTC, east of it, and the business's own (Node reads TZ again when it
// changes).
import { afterAll, describe, expect, it } from 'vitest'
import { countOf, eventSentence, formatDay, formatInstant, formatMonth, formatNumber, formatPercent } from '../../shared/utils/format'

const ORIGINAL_TZ = process.env.TZ
afterAll(() => { process.env.TZ = ORIGINAL_TZ })

for (const zone of ['America/Los_Angeles', 'Pacific/Auckland', 'Europe/London']) {
  describe(`with the computer's clock in ${zone}`, () => {
    it('runs in that zone (the check of the check)', () => {
      process.env.TZ = zone
      // 13 Jul 2026 12:00 UTC is 05:00 in Los Angeles (PDT, UTC−7) and 00:00 the next day in Auckland (NZST, UTC+12):
      // offsets from the IANA time zone database (from memory).
      const local = new Date(Date.UTC(2026, 6, 13, 12)).getHours()
      expect(local).toBe({ 'America/Los_Angeles': 5, 'Pacific/Auckland': 0, 'Europe/London': 13 }[zone])
    })

    it('shows a calendar day as that day, never the day before or after', () => {
      process.env.TZ = zone
      expect(formatDay('2026-07-13')).toBe('13 Jul 2026')
      expect(formatDay('2026-07-13', 'short')).toBe('13 Jul')
      expect(formatDay('2026-07-13', 'long')).toBe('13 July 2026')
      expect(formatDay('2026-07-13', 'weekday')).toBe('Mon 13 Jul') // 13 July 2026 is a Monday (from memory; checked by the next line)
      expect(new Date(Date.UTC(2026, 6, 13)).getUTCDay()).toBe(1)
      expect(formatDay('2026-07-13', 'weekday-long')).toBe('Monday 13 July')
      expect(formatDay('2026-01-01T00:00:00.000Z')).toBe('1 Jan 2026')
      expect(formatMonth('2026-07')).toBe('July 2026')
      expect(formatMonth('2026-07', 'short')).toBe('Jul 26')
    })

    it('shows an instant in the zone it is asked for, whatever the computer says', () => {
      process.env.TZ = zone
      const tap = '2026-07-13T23:30:00Z'
      expect(formatInstant(tap, 'time', 'Europe/London')).toBe('00:30') // BST is UTC+1 in July (from memory)
      expect(formatInstant(tap, 'day', 'Europe/London')).toBe('14 Jul 2026')
      expect(formatInstant(tap, 'day-time', 'America/Los_Angeles')).toBe('13 Jul, 16:30')
      expect(formatInstant(tap, 'medium', 'Pacific/Auckland')).toBe('14 Jul 2026, 11:30')
      expect(formatInstant(new Date('2026-01-05T09:05:00Z'), 'weekday-time', 'Europe/London')).toBe('Mon 5 Jan, 09:05')
    })
  })
}

describe('nothing to show', () => {
  it('answers a dash for a missing or broken value', () => {
    expect(formatDay(null)).toBe('—')
    expect(formatDay('not a day')).toBe('—')
    expect(formatInstant(undefined)).toBe('—')
    expect(formatInstant('yesterday-ish')).toBe('—')
  })
})

describe('numbers and counts', () => {
  it('puts the noun in the singular only where the language says so (Intl.PluralRules)', () => {
    expect(countOf(1, 'false alert')).toBe('1 false alert')
    expect(countOf(0, 'false alert')).toBe('0 false alerts')
    expect(countOf(2, 'miss', 'misses')).toBe('2 misses')
    expect(countOf(1, 'client')).toBe('1 client')
    expect(countOf(12480, 'trial')).toBe('12,480 trials')
    // In French 0 and 1 both take the singular (CLDR plural rules, from memory).
    expect(countOf(0, 'essai', 'essais', 'fr-FR')).toBe('0 essai')
  })
  it('groups digits and rounds shares as the locale does', () => {
    expect(formatNumber(1234567)).toBe('1,234,567')
    expect(formatNumber(2.456, 1)).toBe('2.5')
    expect(formatPercent(0.834)).toBe('83%')
  })
  it('turns an event key into a sentence', () => {
    expect(eventSentence('video_uploaded')).toBe('Video uploaded')
    expect(eventSentence('invoice.paid')).toBe('Invoice paid')
  })
})
