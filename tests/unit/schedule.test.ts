import { describe, expect, it } from 'vitest'
import { addDays } from '../../shared/utils/invoices'
import { dayHeading, dayRange, instantOfWallTime, mondayOf, overlaps, planSeries, visitTimeText, wallTimeOf, zoneDiffers } from '../../shared/utils/schedule'
import { appointmentReminderDue, messageNoticeDue, reminderEnabled } from '../../shared/utils/reminders'
import { appointmentCreateSchema } from '../../shared/schemas/schedule'

// Clock changes used below (IANA tz database, from memory and checked by the assertions themselves):
// Europe/London: 2027-03-28 01:00 GMT → 02:00 BST; 2026-10-25 02:00 BST → 01:00 GMT.
// America/New_York: 2027-03-14 02:00 EST → 03:00 EDT; 2026-11-01 02:00 EDT → 01:00 EST.
const iso = (d: Date) => d.toISOString()

describe('wall times in a time zone', () => {
  it('turns a London wall time into the right instant on each side of the spring change', () => {
    expect(iso(instantOfWallTime('2027-03-27', '10:00', 'Europe/London')!)).toBe('2027-03-27T10:00:00.000Z')
    expect(iso(instantOfWallTime('2027-03-28', '10:00', 'Europe/London')!)).toBe('2027-03-28T09:00:00.000Z')
  })
  it('refuses the hour the clocks skip (London and New York)', () => {
    expect(instantOfWallTime('2027-03-28', '01:30', 'Europe/London')).toBeNull()
    expect(instantOfWallTime('2027-03-14', '02:30', 'America/New_York')).toBeNull()
    expect(instantOfWallTime('2027-03-14', '03:00', 'America/New_York')).not.toBeNull()
  })
  it('takes the later of the two instants in the repeated autumn hour', () => {
    // 01:30 happens twice in London on 2026-10-25: 00:30Z (BST) and 01:30Z (GMT).
    expect(iso(instantOfWallTime('2026-10-25', '01:30', 'Europe/London')!)).toBe('2026-10-25T01:30:00.000Z')
  })
  it('reads an instant back as the wall time', () => {
    expect(wallTimeOf(new Date('2026-07-01T09:00:00Z'), 'Europe/London')).toEqual({ date: '2026-07-01', time: '10:00' })
    expect(wallTimeOf(new Date('2026-07-01T09:00:00Z'), 'Pacific/Auckland')).toEqual({ date: '2026-07-01', time: '21:00' })
  })
  it('gives 23- and 25-hour days on the change days', () => {
    const spring = dayRange('2027-03-28', 'Europe/London')
    const autumn = dayRange('2026-10-25', 'Europe/London')
    expect((spring.to.getTime() - spring.from.getTime()) / 3_600_000).toBe(23)
    expect((autumn.to.getTime() - autumn.from.getTime()) / 3_600_000).toBe(25)
    expect(iso(dayRange('2026-12-02', 'America/New_York').from)).toBe('2026-12-02T05:00:00.000Z')
  })
  it('counts calendar days and weeks without a zone', () => {
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01')
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29')
    expect(mondayOf('2026-12-02')).toBe('2026-11-30') // a Wednesday
    expect(mondayOf('2026-11-30')).toBe('2026-11-30')
    expect(mondayOf('2026-12-06')).toBe('2026-11-30') // a Sunday
  })
})

describe('weekly series', () => {
  it('keeps 10:00 London across the spring change (the instant moves an hour)', () => {
    const { plan } = planSeries({ date: '2027-03-16', time: '10:00' }, 'Europe/London', { everyWeeks: 1, count: 4 })
    expect(plan!.rrule).toBe('FREQ=WEEKLY;INTERVAL=1;COUNT=4')
    expect(plan!.occurrences.map(o => iso(o.startsAt))).toEqual([
      '2027-03-16T10:00:00.000Z', '2027-03-23T10:00:00.000Z', '2027-03-30T09:00:00.000Z', '2027-04-06T09:00:00.000Z',
    ])
  })
  it('keeps 18:00 New York across the autumn change, every two weeks', () => {
    const { plan } = planSeries({ date: '2026-10-20', time: '18:00' }, 'America/New_York', { everyWeeks: 2, count: 3 })
    expect(plan!.rrule).toBe('FREQ=WEEKLY;INTERVAL=2;COUNT=3')
    expect(plan!.occurrences.map(o => iso(o.startsAt))).toEqual(['2026-10-20T22:00:00.000Z', '2026-11-03T23:00:00.000Z', '2026-11-17T23:00:00.000Z'])
  })
  it('turns a last day into the count it gives (inclusive)', () => {
    const { plan } = planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 1, untilDate: '2026-12-22' })
    expect(plan!.rrule).toBe('FREQ=WEEKLY;INTERVAL=1;COUNT=4')
    expect(plan!.occurrences.at(-1)!.date).toBe('2026-12-22')
  })
  it('refuses a series with an occurrence in a skipped hour, naming the day', () => {
    const { plan, problems } = planSeries({ date: '2027-03-21', time: '01:30' }, 'Europe/London', { everyWeeks: 1, count: 3 })
    expect(plan).toBeNull()
    expect(problems.startTime).toContain('2027-03-28')
  })
  it('refuses a series without an end, with both ends, or longer than two years', () => {
    expect(planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 1 }).problems.count).toMatch(/ends/)
    expect(planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 1, count: 3, untilDate: '2027-01-01' }).problems.count).toMatch(/not both/)
    // 2 years = 731 days (our limit): weekly, at most 105 visits (0..104 weeks = 728 days).
    expect(planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 1, count: 105 }).plan).not.toBeNull()
    expect(planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 1, count: 106 }).problems.count).toMatch(/two years/)
    expect(planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 1, untilDate: '2028-12-02' }).problems.untilDate).toMatch(/two years/)
    expect(planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 1, untilDate: '2026-12-01' }).problems.untilDate).toMatch(/after the first/)
    expect(planSeries({ date: '2026-12-01', time: '09:00' }, 'Europe/London', { everyWeeks: 9, count: 2 }).problems.everyWeeks).toBeDefined()
  })
})

describe('the booking schema', () => {
  const base = { clientId: 'c1', kind: 'home-visit', date: '2026-12-03', time: '10:00' }
  it('refuses an end before its start, a zero length and more than 12 hours', () => {
    const fails = (extra: object) => appointmentCreateSchema.safeParse({ ...base, ...extra }).error?.issues.map(i => i.message).join(' ')
    expect(fails({ endTime: '09:00' })).toContain('must be after the start')
    expect(fails({ endTime: '10:00' })).toContain('must be after the start')
    expect(fails({ durationMinutes: 0 })).toContain('at least 5 minutes')
    expect(fails({ durationMinutes: 721 })).toContain('at most 12 hours')
    expect(fails({})).toContain('Enter when the appointment ends')
    expect(fails({ endTime: '25:00' })).toContain('24-hour clock')
    expect(appointmentCreateSchema.safeParse({ ...base, endTime: '11:30' }).success).toBe(true)
    expect(appointmentCreateSchema.safeParse({ ...base, durationMinutes: 720 }).success).toBe(true)
  })
})

describe('overlaps and display', () => {
  const at = (s: string) => new Date(s)
  it('treats touching visits as not overlapping', () => {
    expect(overlaps(at('2026-12-02T10:00:00Z'), 60, at('2026-12-02T11:00:00Z'), 30)).toBe(false)
    expect(overlaps(at('2026-12-02T10:00:00Z'), 61, at('2026-12-02T11:00:00Z'), 30)).toBe(true)
    expect(overlaps(at('2026-12-02T10:30:00Z'), 10, at('2026-12-02T10:00:00Z'), 60)).toBe(true)
  })
  it('shows times in the viewer\'s zone and names it only when it differs from the business\'s', () => {
    const s = '2026-12-02T10:00:00Z'
    const e = '2026-12-02T11:15:00Z'
    expect(visitTimeText(s, e, 'Europe/London', 'Europe/London')).toBe('Wed 2 Dec, 10:00–11:15')
    expect(visitTimeText(s, e, 'America/Los_Angeles', 'Europe/London')).toBe('Wed 2 Dec, 02:00–03:15 GMT-8')
    expect(visitTimeText(s, e, 'Pacific/Auckland', 'Europe/London', { withDay: false })).toBe('23:00–00:15 GMT+13')
    expect(zoneDiffers('Europe/Lisbon', 'Europe/London', at(s))).toBe(false) // same clock in December
  })
  it('names nearby days in words', () => {
    expect(dayHeading('2026-12-02', '2026-12-02')).toBe('Today')
    expect(dayHeading('2026-12-03', '2026-12-02')).toBe('Tomorrow')
    expect(dayHeading('2026-12-09', '2026-12-02')).toBe('Wednesday 9 December')
  })
})

describe('reminder rules', () => {
  const now = new Date('2026-12-02T12:00:00Z')
  it('reminds of a visit within the hours before it and not after it started', () => {
    expect(appointmentReminderDue(new Date('2026-12-03T12:00:00Z'), 24, now)).toBe(true)
    expect(appointmentReminderDue(new Date('2026-12-03T12:01:00Z'), 24, now)).toBe(false)
    expect(appointmentReminderDue(new Date('2026-12-02T12:00:00Z'), 24, now)).toBe(false)
  })
  it('e-mails about new messages at most once an hour', () => {
    expect(messageNoticeDue(null, now)).toBe(true)
    expect(messageNoticeDue(new Date(now.getTime() - 59 * 60_000), now)).toBe(false)
    expect(messageNoticeDue(new Date(now.getTime() - 60 * 60_000), now)).toBe(true)
  })
  it('lets the office switch a kind off for everyone, and each person their own', () => {
    expect(reminderEnabled('appointment', true, undefined)).toBe(true)
    expect(reminderEnabled('appointment', true, false)).toBe(false)
    expect(reminderEnabled('appointment', false, true)).toBe(false)
  })
})
