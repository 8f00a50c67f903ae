import { describe, expect, it } from 'vitest'
import { diaryTotals, matchAlerts } from '../../shared/utils/alerts'
import {
  DAY_MS, effectiveWindow, instantFromLocalInput, leadTimesByMonth, localInputValue, matchEntries, monthInTimeZone,
  periodSentence, periodTotals, refresherCheck, windowProblems, type DiaryPoint,
} from '../../shared/utils/diary'
import { diaryEntryCreateSchema, diaryEntryUpdateSchema, diaryWindowSchema } from '../../shared/schemas/diary'
import { DIARY_POLICY_DEFAULTS, diaryPolicySchema } from '../../shared/schemas/settings-diary'
import { wilsonInterval } from '../../shared/utils/stats'

const alert = (id: string, iso: string): DiaryPoint => ({ id, kind: 'alert', occurredAt: new Date(iso) })
const episode = (id: string, iso: string): DiaryPoint => ({ id, kind: 'episode', occurredAt: new Date(iso) })

describe('matchEntries and periodTotals', () => {
  // Window 0–240 min (the migraine default). Hand-worked:
  //  a0 2026-03-31 23:00Z → e0 2026-04-01 01:00Z: lead 120 (a0 is BEFORE the period starting 2026-04-01 00:00Z)
  //  a1 2026-04-03 06:00Z → e1 2026-04-03 08:30Z: lead 150
  //  a2 2026-04-05 20:00Z: no episode within 4 h → false alert
  //  e2 2026-04-07 09:00Z: no alert → not warned of
  const entries = [
    alert('a0', '2026-03-31T23:00:00Z'), episode('e0', '2026-04-01T01:00:00Z'),
    alert('a1', '2026-04-03T06:00:00Z'), episode('e1', '2026-04-03T08:30:00Z'),
    alert('a2', '2026-04-05T20:00:00Z'), episode('e2', '2026-04-07T09:00:00Z'),
  ]
  const match = matchEntries(entries, { minMinutes: 0, maxMinutes: 240 })

  it('splits entries by kind and matches them', () => {
    expect(match.episodes.map(e => [e.id, e.warned, e.leadMinutes])).toEqual([['e0', true, 120], ['e1', true, 150], ['e2', false, null]])
    expect(match.alerts.map(a => [a.id, a.isTrue])).toEqual([['a0', true], ['a1', true], ['a2', false]])
  })

  it('keeps the whole diary’s matching for a period but counts only the period’s entries', () => {
    const t = periodTotals(entries, match, new Date('2026-04-01T00:00:00Z'))
    // e0 counts as warned (by a0, just before the period); a0 itself is not one of the period's alerts.
    expect(t.episodes).toBe(3)
    expect(t.warnedEpisodes).toBe(2)
    expect(t.alerts).toBe(2)
    expect(t.trueAlerts).toBe(1)
    expect(t.warnedShare).toEqual(wilsonInterval(2, 3))
    expect(t.positivePredictiveValue).toEqual(wilsonInterval(1, 2))
    // Leads 120 and 150: median 135, q1 = 120 + 0.25 × 30 = 127.5, q3 = 142.5 (type-7).
    expect(t.leadMinutes).toEqual({ median: 135, q1: 127.5, q3: 142.5 })
  })

  it('gives the same totals as matchAlerts for the whole diary', () => {
    expect(diaryTotals(match.alerts, match.episodes)).toEqual(match.totals)
    expect(periodTotals(entries, match, new Date(0))).toEqual(match.totals)
  })

  it('words the period for the condition, with the minimum-evidence note', () => {
    const t = periodTotals(entries, match, new Date('2026-04-01T00:00:00Z'))
    expect(periodSentence(t, 'migraine')).toBe(
      'The dog warned of 2 of your last 3 migraines, on average about 2 h 15 min before the first symptoms. '
      + 'Only 3 episodes are logged so far: at least 10 are needed before these figures say much about how reliably the dog warns.',
    )
    expect(periodSentence(t, 'hypoglycaemia')).toMatch(/^The dog warned of 2 of your last 3 low blood sugar episodes/)
    expect(periodSentence(t, 'seizure', 'staff')).toMatch(/^The dog warned of 2 of the person's last 3 seizures/)
  })
})

describe('effectiveWindow and windowProblems', () => {
  it('takes the client’s own window over the policy, else the policy for the condition', () => {
    expect(effectiveWindow({ minMinutes: 5, maxMinutes: 90 }, DIARY_POLICY_DEFAULTS, 'migraine')).toEqual({ window: { minMinutes: 5, maxMinutes: 90 }, source: 'client' })
    expect(effectiveWindow(null, DIARY_POLICY_DEFAULTS, 'seizure')).toEqual({ window: { minMinutes: 0, maxMinutes: 60 }, source: 'policy' })
  })

  it('refuses min over max, negatives, fractions and windows longer than a day', () => {
    expect(windowProblems({ minMinutes: 0, maxMinutes: 240 })).toEqual({})
    expect(windowProblems({ minMinutes: 30, maxMinutes: 30 })).toEqual({})
    expect(windowProblems({ minMinutes: 90, maxMinutes: 60 }).minMinutes).toMatch(/must not be more than/)
    expect(windowProblems({ minMinutes: -1, maxMinutes: 60 }).minMinutes).toMatch(/0 or more/)
    expect(windowProblems({ minMinutes: 0, maxMinutes: 1441 }).maxMinutes).toMatch(/1 to 1440/)
    expect(windowProblems({ minMinutes: 0.5, maxMinutes: 60 }).minMinutes).toMatch(/whole number/)
  })

  it('the shared window schema answers with field errors', () => {
    const bad = diaryWindowSchema.safeParse({ minMinutes: 120, maxMinutes: 60 })
    expect(bad.success).toBe(false)
    expect(bad.error!.issues[0]!.path).toEqual(['minMinutes'])
    expect(diaryWindowSchema.safeParse({ minMinutes: '0', maxMinutes: 60 }).success).toBe(false)
    expect(diaryWindowSchema.safeParse({ minMinutes: 0, maxMinutes: 60, extra: 1 }).success).toBe(false)
  })

  it('ships valid policy defaults, each window from the matching module', () => {
    expect(diaryPolicySchema.parse(DIARY_POLICY_DEFAULTS)).toEqual(DIARY_POLICY_DEFAULTS)
    expect(diaryPolicySchema.safeParse({ ...DIARY_POLICY_DEFAULTS, migraine: { minMinutes: 300, maxMinutes: 240 } }).success).toBe(false)
  })
})

describe('entry schemas', () => {
  it('needs an offset on every time, so no time is read in the wrong zone', () => {
    expect(diaryEntryCreateSchema.safeParse({ kind: 'alert', occurredAt: '2026-05-04T09:30' }).success).toBe(false)
    expect(diaryEntryCreateSchema.safeParse({ kind: 'alert', occurredAt: 'yesterday' }).success).toBe(false)
    expect(diaryEntryCreateSchema.safeParse({ kind: 'alert', occurredAt: '2026-02-30T09:30:00Z' }).success).toBe(false)
    expect(diaryEntryCreateSchema.safeParse({ kind: 'alert', occurredAt: '2026-05-04T24:30:00Z' }).success).toBe(false)
    expect(diaryEntryCreateSchema.safeParse({ kind: 'alert', occurredAt: '1999-12-31T23:59:00Z' }).success).toBe(false)
    const ok = diaryEntryCreateSchema.parse({ kind: 'alert', occurredAt: '2026-05-04T10:30+01:00' })
    expect(ok.occurredAt.toISOString()).toBe('2026-05-04T09:30:00.000Z')
  })

  it('refuses details that belong to the other kind, unknown fields and a kind change', () => {
    const wrong = diaryEntryCreateSchema.safeParse({ kind: 'alert', occurredAt: '2026-05-04T09:30:00Z', severity: 'mild' })
    expect(wrong.success).toBe(false)
    expect(wrong.error!.issues[0]!.path).toEqual(['severity'])
    expect(diaryEntryCreateSchema.safeParse({ kind: 'alert', occurredAt: '2026-05-04T09:30:00Z', clientId: 'x' }).success).toBe(false)
    expect(diaryEntryUpdateSchema.safeParse({ kind: 'episode' }).success).toBe(false)
    expect(diaryEntryUpdateSchema.safeParse({}).success).toBe(false)
    expect(diaryEntryUpdateSchema.parse({ place: '  ', confidence: '' })).toEqual({ place: null, confidence: null })
  })
})

describe('leadTimesByMonth', () => {
  it('groups leads by the month of onset in the viewer’s time zone, filling empty months', () => {
    const entries = [
      // 2026-01-31 23:30 UTC is still January in London (GMT) but February 00:30 in Paris (CET).
      alert('a1', '2026-01-31T22:30:00Z'), episode('e1', '2026-01-31T23:30:00Z'), // lead 60
      alert('a2', '2026-01-10T08:00:00Z'), episode('e2', '2026-01-10T10:00:00Z'), // lead 120
      episode('e3', '2026-03-05T10:00:00Z'), // March: not warned of
    ]
    const match = matchEntries(entries, { minMinutes: 0, maxMinutes: 240 })
    const london = leadTimesByMonth(entries, match, 'Europe/London')
    expect(london.map(m => [m.month, m.episodes, m.warned, m.median])).toEqual([['2026-01', 2, 2, 90], ['2026-02', 0, 0, null], ['2026-03', 1, 0, null]])
    expect(london[0]!.leads).toEqual([120, 60])
    const paris = leadTimesByMonth(entries, match, 'Europe/Paris')
    expect(paris.map(m => [m.month, m.episodes, m.median])).toEqual([['2026-01', 1, 120], ['2026-02', 1, 60], ['2026-03', 1, null]])
  })

  it('crosses a year end and is empty without episodes', () => {
    const entries = [episode('e1', '2025-12-15T10:00:00Z'), episode('e2', '2026-01-15T10:00:00Z')]
    const months = leadTimesByMonth(entries, matchEntries(entries, { minMinutes: 0, maxMinutes: 60 }), 'UTC')
    expect(months.map(m => m.month)).toEqual(['2025-12', '2026-01'])
    expect(leadTimesByMonth([], matchEntries([], { minMinutes: 0, maxMinutes: 60 }), 'UTC')).toEqual([])
    expect(monthInTimeZone(new Date('2026-06-30T23:30:00Z'), 'Not/AZone')).toBe('2026-06')
  })
})

describe('refresherCheck', () => {
  const policy = { recentDays: 30, minRecentEpisodes: 5, refresherBelowPercent: 60 }
  const now = new Date('2026-06-30T12:00:00Z')
  const daysBefore = (d: number, h = 0) => new Date(now.getTime() - d * DAY_MS - h * 3_600_000).toISOString()

  // Earlier (40–60 days ago): 4 episodes, all warned of 1 h ahead. Recent (last 30 days): 5 episodes, `warned` of them warned.
  function diary(warned: number): DiaryPoint[] {
    const out: DiaryPoint[] = []
    for (let i = 0; i < 4; i++) out.push(alert(`oa${i}`, daysBefore(40 + i * 5, 1)), episode(`oe${i}`, daysBefore(40 + i * 5)))
    for (let i = 0; i < 5; i++) {
      if (i < warned) out.push(alert(`ra${i}`, daysBefore(2 + i * 5, 1)))
      out.push(episode(`re${i}`, daysBefore(2 + i * 5)))
    }
    return out
  }

  it('is due when fewer than 60% of at least 5 recent episodes were warned of (2 of 5 = 40%)', () => {
    const entries = diary(2)
    const check = refresherCheck(entries, matchEntries(entries, { minMinutes: 0, maxMinutes: 120 }), policy, now)
    expect(check).toMatchObject({ due: true, recentEpisodes: 5, recentWarned: 2, recentShare: 0.4, earlierShare: 1 })
  })

  it('is not due at exactly the threshold (3 of 5 = 60%) or above', () => {
    for (const warned of [3, 5]) {
      const entries = diary(warned)
      expect(refresherCheck(entries, matchEntries(entries, { minMinutes: 0, maxMinutes: 120 }), policy, now).due).toBe(false)
    }
  })

  it('draws no conclusion from fewer than minRecentEpisodes', () => {
    const entries = diary(0).filter(e => e.id !== 're4')
    const check = refresherCheck(entries, matchEntries(entries, { minMinutes: 0, maxMinutes: 120 }), policy, now)
    expect(check).toMatchObject({ due: false, recentEpisodes: 4, recentWarned: 0, recentShare: 0 })
  })

  it('keeps one dedupe bucket for a whole stretch of recentDays', () => {
    const entries = diary(0)
    const m = matchEntries(entries, { minMinutes: 0, maxMinutes: 120 })
    const bucket = refresherCheck(entries, m, policy, now).bucket
    expect(bucket).toBe(Math.floor(now.getTime() / (30 * DAY_MS)))
    expect(refresherCheck(entries, m, policy, new Date(now.getTime() + 30 * DAY_MS)).bucket).toBe(bucket + 1)
  })
})

describe('wall-clock times in the person’s time zone', () => {
  it('reads a datetime-local value in the zone, summer and winter', () => {
    expect(instantFromLocalInput('2026-07-01T09:00', 'Europe/London')!.toISOString()).toBe('2026-07-01T08:00:00.000Z')
    expect(instantFromLocalInput('2026-01-15T09:00', 'Europe/London')!.toISOString()).toBe('2026-01-15T09:00:00.000Z')
    expect(instantFromLocalInput('2026-07-01T09:00', 'America/New_York')!.toISOString()).toBe('2026-07-01T13:00:00.000Z')
  })

  // London's 2026 changes: clocks go forward at 01:00 GMT on 29 March and back at 02:00 BST on 25 October (from memory;
  // the last Sundays of March and October, EU rule).
  it('moves a time in the spring gap on by the gap', () => {
    expect(instantFromLocalInput('2026-03-29T01:30', 'Europe/London')!.toISOString()).toBe('2026-03-29T01:30:00.000Z')
    expect(localInputValue(new Date('2026-03-29T01:30:00Z'), 'Europe/London')).toBe('2026-03-29T02:30')
    // New York's 2026 spring change: 02:00 EST on 8 March (from memory).
    expect(instantFromLocalInput('2026-03-08T02:30', 'America/New_York')!.toISOString()).toBe('2026-03-08T07:30:00.000Z')
  })

  it('takes the first of the repeated autumn hour in every zone', () => {
    expect(instantFromLocalInput('2026-10-25T01:30', 'Europe/London')!.toISOString()).toBe('2026-10-25T00:30:00.000Z')
    // New York falls back at 02:00 EDT on 1 November 2026 (from memory): 01:30 EDT is 05:30 UTC.
    expect(instantFromLocalInput('2026-11-01T01:30', 'America/New_York')!.toISOString()).toBe('2026-11-01T05:30:00.000Z')
    // Both 01:30s show as 01:30 on the clock.
    expect(localInputValue(new Date('2026-10-25T00:30:00Z'), 'Europe/London')).toBe('2026-10-25T01:30')
    expect(localInputValue(new Date('2026-10-25T01:30:00Z'), 'Europe/London')).toBe('2026-10-25T01:30')
  })

  it('refuses malformed and impossible values, and falls back to UTC for an unknown zone', () => {
    expect(instantFromLocalInput('2026-02-30T09:00', 'Europe/London')).toBeNull()
    expect(instantFromLocalInput('2026-05-04 09:00', 'Europe/London')).toBeNull()
    expect(instantFromLocalInput('', 'Europe/London')).toBeNull()
    expect(instantFromLocalInput('2026-05-04T09:00', 'Not/AZone')!.toISOString()).toBe('2026-05-04T09:00:00.000Z')
  })

  it('an alert logged before the autumn change on the wall clock still leads an episode after it (UTC arithmetic)', () => {
    // Alert 01:40 BST (00:40Z); onset 01:10 GMT (01:10Z): 30 min later in real time though earlier on the clock.
    const a = instantFromLocalInput('2026-10-25T01:40', 'Europe/London')!
    const e = new Date('2026-10-25T01:10:00Z')
    const m = matchAlerts([{ id: 'a', at: a }], [{ id: 'e', onsetAt: e }], { minMinutes: 0, maxMinutes: 60 })
    expect(m.episodes[0]).toMatchObject({ warned: true, leadMinutes: 30 })
  })
})

describe('one alert, one episode, in every figure (summary, chart, refresher)', () => {
  // An alert 30 min before e1 and e2 30 min after e1, then four episodes with no alert (all in June 2026).
  // Old rule: the alert warned of e1 AND e2 (2 of 6 warned). New rule: it warns only its next episode, e1 (1 of 6).
  const now = new Date('2026-06-30T12:00:00Z')
  const entries = [
    alert('a', '2026-06-20T09:00:00Z'), episode('e1', '2026-06-20T09:30:00Z'), episode('e2', '2026-06-20T10:00:00Z'),
    episode('e3', '2026-06-22T10:00:00Z'), episode('e4', '2026-06-24T10:00:00Z'), episode('e5', '2026-06-26T10:00:00Z'),
    episode('e6', '2026-06-28T10:00:00Z'),
  ]
  const match = matchEntries(entries, { minMinutes: 0, maxMinutes: 240 }, { minLeadMinutes: 1 })

  it('the period summary counts 1 of 6 warned of', () => {
    const t = periodTotals(entries, match, new Date('2026-06-01T00:00:00Z'))
    expect([t.warnedEpisodes, t.episodes, t.trueAlerts, t.alerts]).toEqual([1, 6, 1, 1])
  })

  it('the chart’s month counts 1 warned with a lead of 30 min', () => {
    expect(leadTimesByMonth(entries, match, 'UTC')).toEqual([
      { month: '2026-06', episodes: 6, warned: 1, leads: [30], median: 30, q1: 30, q3: 30 },
    ])
  })

  it('the refresher check sees 1 of 6 (17%) and is due', () => {
    const check = refresherCheck(entries, match, { recentDays: 30, minRecentEpisodes: 5, refresherBelowPercent: 60 }, now)
    expect(check).toMatchObject({ due: true, recentEpisodes: 6, recentWarned: 1 })
    expect(check.recentShare).toBeCloseTo(1 / 6, 12)
  })

  it('ships a least lead of 1 minute in the policy and refuses a negative one', () => {
    expect(DIARY_POLICY_DEFAULTS.minLeadMinutes).toBe(1) // common practice
    expect(diaryPolicySchema.safeParse({ ...DIARY_POLICY_DEFAULTS, minLeadMinutes: -1 }).success).toBe(false)
  })
})
