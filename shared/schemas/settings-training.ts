// The training policy: the default readiness criteria of measured milestones (a trainer may tighten them per client).
import { DEFAULT_CRITERIA, type ReadinessCriteria } from '../utils/training'
import { defineSetting } from './settings'
import { criteriaSchema } from './training'

export const TRAINING_POLICY_KEY = 'training'
export const TRAINING_POLICY_DEFAULTS: ReadinessCriteria = { ...DEFAULT_CRITERIA } // each figure's source: shared/utils/training.ts

export const trainingPolicy = defineSetting(TRAINING_POLICY_KEY, {
  label: 'Readiness criteria',
  description: 'What a measured milestone needs before the trainer can sign it off without a written reason: enough trials, sessions and days in the recent window, a share run blind, and lower 95% bounds of sensitivity and specificity. A trainer can make them stricter for one client, never looser.',
  schema: criteriaSchema,
  defaults: TRAINING_POLICY_DEFAULTS,
  fieldLabels: {
    windowDays: 'Count the last (days)',
    minTrials: 'At least this many trials',
    minSessions: 'Over at least this many sessions',
    minDays: 'On at least this many different days',
    minBlindPercent: 'At least this share blind (%)',
    minSensitivityLowerPercent: 'Sensitivity lower bound at least (%)',
    minSpecificityLowerPercent: 'Specificity lower bound at least (%)',
  },
})
