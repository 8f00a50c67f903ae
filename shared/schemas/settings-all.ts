// Every business policy, by key. Add one import and one list entry per feature.
import type { SettingDefinition } from './settings'
import { businessProfile } from './settings-business'
import { businessIdentity } from './settings-identity'
import { samplePolicySetting } from './settings-samples'
import { diaryPolicy } from './settings-diary'
import { invoicePolicy, reminderPolicy } from './settings-invoices'
import { trainingPolicy } from './settings-training'
import { homeworkUploadPolicy } from './settings-homework'
import { securityPolicy } from './settings-security'
import { workingDayPolicy } from './settings-working-day'

const ALL: SettingDefinition<any>[] = [businessProfile, businessIdentity, samplePolicySetting, diaryPolicy, invoicePolicy, reminderPolicy, trainingPolicy, homeworkUploadPolicy, securityPolicy, workingDayPolicy]

export const SETTINGS: Record<string, SettingDefinition<any>> = Object.fromEntries(ALL.map(d => [d.key, d]))
