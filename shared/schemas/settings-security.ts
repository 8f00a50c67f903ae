// The office's security policy: whether every staff account (admin and trainer) must use a second factor.
import { z } from 'zod'
import { defineSetting } from './settings'

export const securityPolicySchema = z.object({
  staffSecondFactor: z.boolean({ invalid_type_error: 'Choose yes or no.' }),
})
export type SecurityPolicy = z.infer<typeof securityPolicySchema>

export const SECURITY_POLICY_KEY = 'security'
// Off by default, so a new business can sign in and set it up first; the office turns it on (docs/security.md).
export const SECURITY_POLICY_DEFAULTS: SecurityPolicy = { staffSecondFactor: false }

export const securityPolicy = defineSetting(SECURITY_POLICY_KEY, {
  label: 'Sign-in security',
  description: 'When on, every admin and trainer must sign in with a second factor (a code from an authenticator app) and is asked to set one up before anything else.',
  schema: securityPolicySchema,
  defaults: SECURITY_POLICY_DEFAULTS,
  fieldLabels: { staffSecondFactor: 'Second factor required for all staff' },
})
