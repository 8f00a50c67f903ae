// Every business policy, by key. Add one import and one list entry per feature.
import type { SettingDefinition } from './settings'
import { businessProfile } from './settings-business'
import { samplePolicySetting } from './settings-samples'
import { diaryPolicy } from './settings-diary'

const ALL: SettingDefinition<any>[] = [businessProfile, samplePolicySetting, diaryPolicy]

export const SETTINGS: Record<string, SettingDefinition<any>> = Object.fromEntries(ALL.map(d => [d.key, d]))
