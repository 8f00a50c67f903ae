// The alert diary's policy: the warning window per condition (a trainer may set a client's own), the period the
// summaries cover, and when the trainer is e-mailed to plan a refresher.
import { z } from 'zod'
import { numeric } from './common'
import { DEFAULT_ALERT_WINDOWS, DEFAULT_MIN_LEAD_MINUTES } from '../utils/alerts'
import { MAX_WINDOW_MINUTES, windowProblems } from '../utils/diary'
import { defineSetting } from './settings'

const minutes = z.number({ invalid_type_error: 'Enter a number of minutes.' }).int('Use whole minutes.')
const windowSchema = z.object({
  minMinutes: numeric(minutes.min(0, 'Use 0 or more minutes.')),
  maxMinutes: numeric(minutes.min(1, 'Use at least 1 minute.').max(MAX_WINDOW_MINUTES, `Use at most ${MAX_WINDOW_MINUTES} minutes (a day).`)),
}).superRefine((w, ctx) => {
  for (const [path, message] of Object.entries(windowProblems(w))) ctx.addIssue({ code: 'custom', path: [path], message })
})

export const diaryPolicySchema = z.object({
  summaryDays: numeric(z.number().int('Use whole days.').min(7, 'Use at least 7 days.').max(730, 'Use at most 730 days.')),
  recentDays: numeric(z.number().int('Use whole days.').min(7, 'Use at least 7 days.').max(365, 'Use at most 365 days.')),
  minRecentEpisodes: numeric(z.number().int('Use a whole number.').min(1, 'Use at least 1.').max(100, 'Use at most 100.')),
  refresherBelowPercent: numeric(z.number().min(1, 'Use 1 to 100 percent.').max(100, 'Use 1 to 100 percent.')),
  minLeadMinutes: numeric(z.number({ invalid_type_error: 'Enter a number of minutes.' }).int('Use whole minutes.').min(0, 'Use 0 or more minutes.').max(60, 'Use at most 60 minutes.')),
  migraine: windowSchema,
  hypoglycaemia: windowSchema,
  seizure: windowSchema,
  other: windowSchema,
})
export type DiaryPolicy = z.infer<typeof diaryPolicySchema>

export const DIARY_POLICY_KEY = 'diary'
export const DIARY_POLICY_DEFAULTS: DiaryPolicy = {
  // The summaries and the roster column cover the last 90 days: recent enough to show today's dog, long enough to
  // hold a dozen episodes for most households (common practice).
  summaryDays: 90,
  // Refresher: fewer than 60% of at least 5 episodes warned of in the last 30 days (common practice; a trainer's
  // rule of thumb, not a clinical threshold).
  recentDays: 30,
  minRecentEpisodes: 5,
  refresherBelowPercent: 60,
  // An alert less than a minute before onset (logged in the same minute) is an alert at onset, not a warning
  // (common practice).
  minLeadMinutes: DEFAULT_MIN_LEAD_MINUTES,
  // Windows per condition: see DEFAULT_ALERT_WINDOWS in shared/utils/alerts.ts for each one's source.
  migraine: { ...DEFAULT_ALERT_WINDOWS.migraine },
  hypoglycaemia: { ...DEFAULT_ALERT_WINDOWS.hypoglycaemia },
  seizure: { ...DEFAULT_ALERT_WINDOWS.seizure },
  other: { ...DEFAULT_ALERT_WINDOWS.other },
}

export const diaryPolicy = defineSetting(DIARY_POLICY_KEY, {
  label: 'Alert diary',
  description: 'How long before an episode an alert counts as a warning of it (per condition; a trainer can set a client\'s own), the least lead of a warning (closer alerts are shown as "at onset"), the period the diary summaries cover, and when the trainer is e-mailed to plan a refresher because fewer episodes were warned of.',
  schema: diaryPolicySchema,
  defaults: DIARY_POLICY_DEFAULTS,
  fieldLabels: {
    summaryDays: 'Summaries cover the last (days)',
    recentDays: 'Refresher check: recent period (days)',
    minRecentEpisodes: 'Refresher check: at least this many episodes',
    refresherBelowPercent: 'Refresher when warned of below (%)',
    minLeadMinutes: 'Least lead of a warning (minutes before onset; closer is "at onset")',
    migraine: 'Migraine window (minutes before onset)',
    hypoglycaemia: 'Hypoglycaemia window (minutes before onset)',
    seizure: 'Seizure window (minutes before onset)',
    other: 'Other conditions window (minutes before onset)',
    'migraine.minMinutes': 'Nearest end (min before onset)', 'migraine.maxMinutes': 'Farthest end (min before onset)',
    'hypoglycaemia.minMinutes': 'Nearest end (min before onset)', 'hypoglycaemia.maxMinutes': 'Farthest end (min before onset)',
    'seizure.minMinutes': 'Nearest end (min before onset)', 'seizure.maxMinutes': 'Farthest end (min before onset)',
    'other.minMinutes': 'Nearest end (min before onset)', 'other.maxMinutes': 'Farthest end (min before onset)',
  },
})
