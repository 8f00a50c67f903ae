import { z } from 'zod'
import { numeric } from './common'
import { defineSetting } from './settings'
import { DEFAULT_SAMPLE_POLICY, type SamplePolicy } from '../utils/samples'

const whole = (min: number, max: number, what: string) => numeric(z.number({ invalid_type_error: `Enter ${what} as a number.` })
  .int(`Enter ${what} as a whole number.`).min(min, `Use at least ${min}.`).max(max, `Use at most ${max}.`))

/** The sample-bank policy; its defaults (DEFAULT_SAMPLE_POLICY) are common practice, each marked where defined. */
export const samplePolicySchema: z.ZodType<SamplePolicy> = z.object({
  fastingMinutes: whole(0, 24 * 60, 'the minutes'),
  waterFreeMinutes: whole(0, 24 * 60, 'the minutes'),
  unscentedSoapRequired: z.boolean(),
  maxRollsPerBag: whole(1, 50, 'the rolls'),
  maxBagsPerOuterBag: whole(1, 50, 'the bags'),
  renewAfterDays: whole(1, 3650, 'the days'),
  expireAfterDays: whole(1, 3650, 'the days'),
  maxUsesPerSample: whole(1, 100, 'the uses'),
  maxMinutesOutPerUse: whole(1, 120, 'the minutes'),
  imprintingSingleUse: z.boolean(),
  restockThresholdDays: whole(0, 365, 'the days'),
  forecastWindowDays: whole(1, 365, 'the days'),
  forecastMinDays: whole(1, 365, 'the days'),
  overLimitIsLastUse: z.boolean(),
  targetMaxMinutesAfterSymptoms: whole(1, 24 * 60, 'the minutes'),
  flagMedicatedTargets: z.boolean(),
}).refine(p => p.renewAfterDays <= p.expireAfterDays, {
  message: 'Renewal must come before (or on) expiry.', path: ['renewAfterDays'],
}).refine(p => p.forecastMinDays <= p.forecastWindowDays, {
  message: 'The shortest measuring span cannot be longer than the rate window.', path: ['forecastMinDays'],
}) as unknown as z.ZodType<SamplePolicy>

export const SAMPLE_POLICY_KEY = 'samples'

export const samplePolicySetting = defineSetting<SamplePolicy>(SAMPLE_POLICY_KEY, {
  label: 'Scent samples',
  description: 'How samples are collected, packed, aged and used, and when a household is reminded to collect more. Defaults follow common practice.',
  schema: samplePolicySchema,
  defaults: { ...DEFAULT_SAMPLE_POLICY },
  fieldLabels: {
    fastingMinutes: 'No food, drink, brushing, gum, alcohol or smoking for (minutes)',
    waterFreeMinutes: 'No water for (minutes)',
    unscentedSoapRequired: 'Hands washed with unscented soap',
    maxRollsPerBag: 'Most cotton rolls in one small bag',
    maxBagsPerOuterBag: 'Most small bags in one outer bag',
    renewAfterDays: 'Maintenance only after (days)',
    expireAfterDays: 'Expired after (days)',
    maxUsesPerSample: 'Most uses of one sample',
    maxMinutesOutPerUse: 'Most minutes out of the freezer per use',
    imprintingSingleUse: 'Imprinting uses throw the sample away',
    restockThresholdDays: 'Remind to collect when stock runs out within (days)',
    forecastWindowDays: 'Rate of use measured over the last (days)',
    forecastMinDays: 'A young bank\'s rate measured over its age, but at least (days)',
    overLimitIsLastUse: 'A use longer than the limit is the sample\'s last (it thawed)',
    targetMaxMinutesAfterSymptoms: 'Flag targets collected later than this after the first symptoms (minutes)',
    flagMedicatedTargets: 'Flag targets collected after medication for the episode',
  },
})
