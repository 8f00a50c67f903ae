import { TZDate } from '@date-fns/tz'
import { describe, expect, it } from 'vitest'
import {
  DEFAULT_ALERT_WINDOWS,
  DEFAULT_MIN_LEAD_MINUTES,
  MIN_EPISODES_FOR_EVIDENCE,
  formatDuration,
  matchAlerts,
  summariseDiary,
  validateAlertWindow,
  type DiaryAlert,
  type DiaryEpisode,
} from '../../shared/utils/alerts'
import { CONDITIONS } from '../../shared/utils/enums'
import { wilsonInterval } from '../../shared/utils/stats'

const at = (iso: string) => new Date(iso)
const alert = (id: string, iso: string): DiaryAlert => ({ id, at: at(iso) })
const episode = (id: string, iso: string): DiaryEpisode => ({ id, onsetAt: at(iso) })

describe('matchAlerts: a hand-worked week (window 0 to 120 min before onset, least lead 1 min)', () => {
  const window = { minMinutes: 0, maxMinutes: 120 }
  // Given out of time order on purpose; the output must follow this input order.
  const alerts = [
    alert('a5', '2026-05-06T07:55:00Z'), //  5 min before e3
    alert('a1', '2026-05-04T09:30:00Z'), // 30 min before e1, its next episode (e2 90 min later gets no credit)
    alert('a6', '2026-05-07T12:00:00Z'), // next episode e4 is 32 h later: false alert
    alert('a3', '2026-05-06T06:20:00Z'), // 100 min before e3: its earliest
    alert('a2', '2026-05-04T10:45:00Z'), // after e1's onset; its next episode is e2, 15 min later
    alert('a7', '2026-05-08T20:10:00Z'), // 10 min AFTER e4's onset and no episode follows: false
    alert('a4', '2026-05-06T07:40:00Z'), // 20 min before e3
  ]
  const episodes = [
    episode('e3', '2026-05-06T08:00:00Z'),
    episode('e1', '2026-05-04T10:00:00Z'),
    episode('e4', '2026-05-08T20:00:00Z'),
    episode('e2', '2026-05-04T11:00:00Z'),
  ]
  const result = matchAlerts(alerts, episodes, window)

  it('credits each alert to its next episode only, in input order', () => {
    expect(result.alerts).toEqual([
      { id: 'a5', outcome: 'warning', episodeId: 'e3', isTrue: true },
      { id: 'a1', outcome: 'warning', episodeId: 'e1', isTrue: true },
      { id: 'a6', outcome: 'false', episodeId: null, isTrue: false },
      { id: 'a3', outcome: 'warning', episodeId: 'e3', isTrue: true },
      { id: 'a2', outcome: 'warning', episodeId: 'e2', isTrue: true },
      { id: 'a7', outcome: 'false', episodeId: null, isTrue: false },
      { id: 'a4', outcome: 'warning', episodeId: 'e3', isTrue: true },
    ])
  })

  it('takes each episode’s lead from its earliest credited alert, in input order', () => {
    expect(result.episodes).toEqual([
      { id: 'e3', alertIds: ['a3', 'a4', 'a5'], atOnsetAlertIds: [], warned: true, leadMinutes: 100 },
      { id: 'e1', alertIds: ['a1'], atOnsetAlertIds: [], warned: true, leadMinutes: 30 },
      { id: 'e4', alertIds: [], atOnsetAlertIds: [], warned: false, leadMinutes: null },
      // Under the old rule e2 also took a1 and showed a 90 min lead; now only a2 (15 min) is its own.
      { id: 'e2', alertIds: ['a2'], atOnsetAlertIds: [], warned: true, leadMinutes: 15 },
    ])
  })

  it('totals with Wilson intervals and lead quartiles', () => {
    const { totals } = result
    expect(totals.alerts).toBe(7)
    expect(totals.episodes).toBe(4)
    expect(totals.trueAlerts).toBe(5)
    expect(totals.atOnsetAlerts).toBe(0)
    expect(totals.falseAlerts).toBe(2)
    expect(totals.warnedEpisodes).toBe(3)
    expect(totals.positivePredictiveValue).toEqual(wilsonInterval(5, 7))
    expect(totals.positivePredictiveValue?.estimate).toBeCloseTo(5 / 7, 12)
    expect(totals.warnedShare).toEqual(wilsonInterval(3, 4))
    expect(totals.warnedShare?.estimate).toBe(0.75)
    // Leads 15, 30, 100 (type-7 quantiles, h = 2p): q1 = 15 + 0.5 × 15 = 22.5, median 30, q3 = 30 + 0.5 × 70 = 65.
    expect(totals.leadMinutes).toEqual({ median: 30, q1: 22.5, q3: 65 })
  })

  it('gives the same matching whatever order the input comes in', () => {
    const reversed = matchAlerts([...alerts].reverse(), [...episodes].reverse(), window)
    expect([...reversed.alerts].reverse()).toEqual(result.alerts)
    expect([...reversed.episodes].reverse()).toEqual(result.episodes)
    expect(reversed.totals).toEqual(result.totals)
  })
})

describe('matchAlerts: one alert, at most one episode', () => {
  const window = { minMinutes: 0, maxMinutes: 240 }

  it('two episodes 30 minutes apart and one alert before the first: only the first is warned of', () => {
    const result = matchAlerts(
      [alert('a', '2026-06-01T09:00:00Z')],
      [episode('e1', '2026-06-01T09:30:00Z'), episode('e2', '2026-06-01T10:00:00Z')],
      window,
    )
    expect(result.episodes.map((e) => [e.id, e.warned, e.leadMinutes])).toEqual([['e1', true, 30], ['e2', false, null]])
    // 1 of 2 warned of (it was 2 of 2 when the alert was credited to both).
    expect(result.totals.warnedEpisodes).toBe(1)
    expect(result.totals.warnedShare).toEqual(wilsonInterval(1, 2))
    expect(result.totals.trueAlerts).toBe(1)
  })

  it('an alert between two episodes warns only the later one', () => {
    const result = matchAlerts(
      [alert('a', '2026-06-01T09:45:00Z')],
      [episode('e1', '2026-06-01T09:30:00Z'), episode('e2', '2026-06-01T10:00:00Z')],
      window,
    )
    expect(result.alerts[0]).toEqual({ id: 'a', outcome: 'warning', episodeId: 'e2', isTrue: true })
    expect(result.episodes.map((e) => e.warned)).toEqual([false, true])
  })

  it('two episodes logged at the same instant: the first in input order takes the alert', () => {
    const result = matchAlerts(
      [alert('a', '2026-06-01T09:00:00Z')],
      [episode('first', '2026-06-01T10:00:00Z'), episode('second', '2026-06-01T10:00:00Z')],
      window,
    )
    expect(result.episodes.map((e) => e.warned)).toEqual([true, false])
  })

  it('the next episode outside the window makes a false alert', () => {
    const result = matchAlerts(
      [alert('a', '2026-06-01T09:00:00Z')],
      [episode('far', '2026-06-01T13:00:00.001Z')], // 240 min and 1 ms later
      window,
    )
    expect(result.alerts[0]?.outcome).toBe('false')
    expect(result.totals.falseAlerts).toBe(1)
  })
})

describe('matchAlerts: window edges', () => {
  const window = { minMinutes: 10, maxMinutes: 60 }
  const onset = episode('e', '2026-06-01T12:00:00Z')

  it('includes alerts exactly at onset - max and at onset - min', () => {
    const result = matchAlerts(
      [alert('at-max', '2026-06-01T11:00:00Z'), alert('at-min', '2026-06-01T11:50:00Z')],
      [onset],
      window,
    )
    expect(result.alerts.map((a) => a.isTrue)).toEqual([true, true])
    expect(result.episodes[0]).toEqual({ id: 'e', alertIds: ['at-max', 'at-min'], atOnsetAlertIds: [], warned: true, leadMinutes: 60 })
  })

  it('a millisecond too early is false; inside the last minMinutes or at onset is "at onset"; after onset is false', () => {
    const result = matchAlerts(
      [
        alert('too-early', '2026-06-01T10:59:59.999Z'),
        alert('too-late', '2026-06-01T11:50:00.001Z'),
        alert('at-onset', '2026-06-01T12:00:00Z'),
        alert('after', '2026-06-01T12:05:00Z'),
      ],
      [onset],
      window,
    )
    expect(result.alerts.map((a) => a.outcome)).toEqual(['false', 'at-onset', 'at-onset', 'false'])
    expect(result.alerts.every((a) => !a.isTrue)).toBe(true)
    expect(result.episodes[0]).toEqual({ id: 'e', alertIds: [], atOnsetAlertIds: ['too-late', 'at-onset'], warned: false, leadMinutes: null })
    expect(result.totals.leadMinutes).toBeNull()
    // 0 true of 4 alerts: alerts at onset count as alerts that did not warn; 2 at onset, 2 false.
    expect(result.totals.positivePredictiveValue?.estimate).toBe(0)
    expect([result.totals.atOnsetAlerts, result.totals.falseAlerts]).toEqual([2, 2])
  })

  it('keeps fractional minutes rather than rounding the lead', () => {
    const result = matchAlerts([alert('a', '2026-06-01T11:17:30Z')], [onset], window)
    expect(result.episodes[0]?.leadMinutes).toBe(42.5)
  })
})

describe('matchAlerts: the least lead of a warning (policy, default 1 minute)', () => {
  const window = { minMinutes: 0, maxMinutes: 60 }
  const onset = episode('e', '2026-06-01T12:00:00Z')
  const one = (iso: string, minLeadMinutes?: number) =>
    matchAlerts([alert('a', iso)], [onset], window, minLeadMinutes === undefined ? {} : { minLeadMinutes })

  it('defaults to 1 minute', () => {
    expect(DEFAULT_MIN_LEAD_MINUTES).toBe(1) // common practice
  })

  it('a lead of exactly 1 minute is a warning; 1 ms less is an alert at onset', () => {
    expect(one('2026-06-01T11:59:00Z').alerts[0]?.outcome).toBe('warning')
    expect(one('2026-06-01T11:59:00Z').episodes[0]?.leadMinutes).toBe(1)
    expect(one('2026-06-01T11:59:00.001Z').alerts[0]?.outcome).toBe('at-onset')
  })

  it('an alert in the same minute as onset is at onset (it was a warning with lead 0 before)', () => {
    const r = one('2026-06-01T12:00:00Z')
    expect(r.alerts[0]).toEqual({ id: 'a', outcome: 'at-onset', episodeId: 'e', isTrue: false })
    expect(r.episodes[0]).toMatchObject({ warned: false, atOnsetAlertIds: ['a'], leadMinutes: null })
    expect(r.totals).toMatchObject({ alerts: 1, trueAlerts: 0, atOnsetAlerts: 1, falseAlerts: 0, warnedEpisodes: 0 })
  })

  it('an alert tapped up to a minute after onset is at onset; a full minute after is false', () => {
    expect(one('2026-06-01T12:00:59.999Z').alerts[0]?.outcome).toBe('at-onset')
    expect(one('2026-06-01T12:01:00Z').alerts[0]?.outcome).toBe('false')
  })

  it('with a least lead of 0 an alert at the very moment of onset is a warning with lead 0, and one after it is false', () => {
    expect(one('2026-06-01T12:00:00Z', 0).episodes[0]).toMatchObject({ warned: true, leadMinutes: 0 })
    expect(one('2026-06-01T12:00:00.001Z', 0).alerts[0]?.outcome).toBe('false')
  })

  it('the larger of the window’s near end and the least lead applies', () => {
    const r = matchAlerts([alert('a', '2026-06-01T11:51:00Z')], [onset], { minMinutes: 10, maxMinutes: 60 }, { minLeadMinutes: 1 })
    expect(r.alerts[0]?.outcome).toBe('at-onset') // 9 min < 10
    const s = matchAlerts([alert('a', '2026-06-01T11:57:00Z')], [onset], { minMinutes: 0, maxMinutes: 60 }, { minLeadMinutes: 5 })
    expect(s.alerts[0]?.outcome).toBe('at-onset') // 3 min < 5
  })

  it('refuses a negative or unknown least lead', () => {
    expect(() => matchAlerts([], [onset], window, { minLeadMinutes: -1 })).toThrow(/least lead/)
    expect(() => matchAlerts([], [onset], window, { minLeadMinutes: Number.NaN })).toThrow(RangeError)
  })
})

describe('matchAlerts: daylight-saving changes in Europe/London', () => {
  const migraine = DEFAULT_ALERT_WINDOWS.migraine

  // UK clocks go forward at 01:00 GMT on 29 March 2026 and back at 01:00 GMT on 25 October 2026 (from memory:
  // last Sunday of March and of October); the wall-clock checks below confirm it against the time-zone database.
  it('spring forward: 00:45 GMT to 02:30 BST looks like 1 h 45 min on the clock but is 45 min', () => {
    const alertAt = at('2026-03-29T00:45:00+00:00')
    const onsetAt = at('2026-03-29T02:30:00+01:00')
    const alertLocal = new TZDate(alertAt.getTime(), 'Europe/London')
    const onsetLocal = new TZDate(onsetAt.getTime(), 'Europe/London')
    expect([alertLocal.getHours(), alertLocal.getMinutes(), alertLocal.getTimezoneOffset() + 0]).toEqual([0, 45, 0])
    expect([onsetLocal.getHours(), onsetLocal.getMinutes(), onsetLocal.getTimezoneOffset() + 0]).toEqual([2, 30, -60])

    const result = matchAlerts([{ id: 'a', at: alertAt }], [{ id: 'e', onsetAt }], migraine)
    expect(result.episodes[0]?.leadMinutes).toBe(45)
    expect(summariseDiary(result, 'migraines')).toContain('about 45 min before')
  })

  it('fall back: an alert at 01:30 BST before an onset at 01:15 GMT is 45 min ahead, not after', () => {
    const alertAt = at('2026-10-25T01:30:00+01:00')
    const onsetAt = at('2026-10-25T01:15:00+00:00')
    const alertLocal = new TZDate(alertAt.getTime(), 'Europe/London')
    const onsetLocal = new TZDate(onsetAt.getTime(), 'Europe/London')
    expect([alertLocal.getHours(), alertLocal.getMinutes(), alertLocal.getTimezoneOffset() + 0]).toEqual([1, 30, -60])
    expect([onsetLocal.getHours(), onsetLocal.getMinutes(), onsetLocal.getTimezoneOffset() + 0]).toEqual([1, 15, 0])

    const result = matchAlerts([{ id: 'a', at: alertAt }], [{ id: 'e', onsetAt }], { minMinutes: 0, maxMinutes: 60 })
    expect(result.alerts[0]?.isTrue).toBe(true)
    expect(result.episodes[0]?.leadMinutes).toBe(45)
  })
})

describe('matchAlerts: lead-time median and quartiles', () => {
  it('summarises five leads 10, 20, 30, 40, 100 as median 30, q1 20, q3 40', () => {
    const leads = [40, 10, 100, 30, 20]
    const episodes = leads.map((_, i) => episode(`e${i}`, `2026-07-0${i + 1}T12:00:00Z`))
    const alerts = leads.map((lead, i) => ({ id: `a${i}`, at: new Date(Date.parse(`2026-07-0${i + 1}T12:00:00Z`) - lead * 60_000) }))
    const result = matchAlerts(alerts, episodes, { minMinutes: 0, maxMinutes: 120 })
    expect(result.episodes.map((e) => e.leadMinutes)).toEqual(leads)
    expect(result.totals.leadMinutes).toEqual({ median: 30, q1: 20, q3: 40 })
  })

  it('has no totals to speak of for an empty diary', () => {
    const result = matchAlerts([], [], { minMinutes: 0, maxMinutes: 60 })
    expect(result.totals).toEqual({
      alerts: 0,
      episodes: 0,
      trueAlerts: 0,
      atOnsetAlerts: 0,
      falseAlerts: 0,
      warnedEpisodes: 0,
      warnedShare: null,
      positivePredictiveValue: null,
      leadMinutes: null,
    })
  })
})

describe('matchAlerts: validation', () => {
  const e = [episode('e', '2026-06-01T12:00:00Z')]

  it('rejects a window that is negative, reversed or not finite', () => {
    expect(() => matchAlerts([], e, { minMinutes: -5, maxMinutes: 60 })).toThrow(/minMinutes must be 0 or more/)
    expect(() => matchAlerts([], e, { minMinutes: 30, maxMinutes: 10 })).toThrow(
      /minMinutes \(30\) must not be greater than maxMinutes \(10\)/,
    )
    expect(() => matchAlerts([], e, { minMinutes: 0, maxMinutes: Number.POSITIVE_INFINITY })).toThrow(/finite/)
    expect(() => matchAlerts([], e, { minMinutes: Number.NaN, maxMinutes: 10 })).toThrow(RangeError)
    expect(() => validateAlertWindow({ minMinutes: 15, maxMinutes: 15 })).not.toThrow()
  })

  it('rejects invalid dates, naming the entry', () => {
    expect(() => matchAlerts([{ id: 'bad', at: new Date('not a date') }], e, { minMinutes: 0, maxMinutes: 60 })).toThrow(
      /Alert "bad" has an invalid date/,
    )
    expect(() =>
      matchAlerts([], [{ id: 'ep9', onsetAt: new Date(Number.NaN) }], { minMinutes: 0, maxMinutes: 60 }),
    ).toThrow(/Episode "ep9" has an invalid date/)
  })

  it('rejects repeated ids', () => {
    const a = alert('x', '2026-06-01T11:30:00Z')
    expect(() => matchAlerts([a, a], e, { minMinutes: 0, maxMinutes: 60 })).toThrow(/Alert id "x" appears more than once/)
  })

  it('ships a valid default window for every condition', () => {
    expect(Object.keys(DEFAULT_ALERT_WINDOWS).sort()).toEqual([...CONDITIONS].sort())
    for (const window of Object.values(DEFAULT_ALERT_WINDOWS)) expect(() => validateAlertWindow(window)).not.toThrow()
  })
})

describe('summariseDiary', () => {
  // Twelve migraines, nine warned of with these leads (median 100 min); three not warned of.
  const leads = [40, 60, 80, 95, 100, 110, 150, 200, 230]
  const onsetIso = (day: number) => `2026-04-${String(day).padStart(2, '0')}T15:00:00Z`
  const episodes = Array.from({ length: 12 }, (_, i) => episode(`m${i + 1}`, onsetIso(i + 1)))
  const alerts = leads.map((lead, i) => ({ id: `a${i + 1}`, at: new Date(Date.parse(onsetIso(i + 1)) - lead * 60_000) }))

  it('says how many episodes were warned of and the median lead, as h and min', () => {
    const result = matchAlerts(alerts, episodes, DEFAULT_ALERT_WINDOWS.migraine)
    expect(result.totals.warnedEpisodes).toBe(9)
    expect(result.totals.leadMinutes?.median).toBe(100)
    expect(summariseDiary(result, 'migraines')).toBe(
      'The dog warned of 9 of your last 12 migraines, on average about 1 h 40 min before the first symptoms.',
    )
  })

  it('adds a minimum-evidence note below ten episodes', () => {
    expect(MIN_EPISODES_FOR_EVIDENCE).toBe(10)
    const result = matchAlerts(alerts.slice(0, 3), episodes.slice(0, 4), DEFAULT_ALERT_WINDOWS.migraine)
    expect(summariseDiary(result, 'migraines')).toBe(
      'The dog warned of 3 of your last 4 migraines, on average about 1 h before the first symptoms. ' +
        'Only 4 episodes are logged so far: at least 10 are needed before these figures say much about how reliably the dog warns.',
    )
    const nine = matchAlerts(alerts, episodes.slice(0, 9), DEFAULT_ALERT_WINDOWS.migraine)
    expect(summariseDiary(nine, 'migraines')).toContain('Only 9 episodes')
    const ten = matchAlerts(alerts, episodes.slice(0, 10), DEFAULT_ALERT_WINDOWS.migraine)
    expect(summariseDiary(ten, 'migraines')).not.toContain('Only')
  })

  it('words the cases of no episodes, one episode and no warnings', () => {
    const window = DEFAULT_ALERT_WINDOWS.seizure
    expect(summariseDiary(matchAlerts([], [], window), 'seizures')).toBe(
      "No seizures are logged yet, so there is nothing yet to measure the dog's warnings against.",
    )
    const one = matchAlerts([alert('a', '2026-04-01T14:35:00Z')], [episode('s', '2026-04-01T15:00:00Z')], window)
    expect(summariseDiary(one, 'seizures')).toBe(
      'One of your seizures is logged so far, and the dog warned of it about 25 min before the first symptoms. ' +
        'Only 1 episode is logged so far: at least 10 are needed before these figures say much about how reliably the dog warns.',
    )
    const none = matchAlerts([], episodes, DEFAULT_ALERT_WINDOWS.migraine)
    expect(summariseDiary(none, 'migraines')).toBe('The dog did not warn of any of your last 12 migraines.')
  })

  it('formats durations as "X h Y min" or "Y min"', () => {
    expect(formatDuration(45)).toBe('45 min')
    expect(formatDuration(100)).toBe('1 h 40 min')
    expect(formatDuration(120)).toBe('2 h')
    expect(formatDuration(59.6)).toBe('1 h')
    expect(formatDuration(0.2)).toBe('less than a minute')
    expect(() => formatDuration(-1)).toThrow(RangeError)
  })
})
