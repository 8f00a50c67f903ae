// Every business policy, by key. Add one import and one list entry per feature.
import type { SettingDefinition } from './settings'
import { businessProfile } from './settings-business'

const ALL: SettingDefinition<any>[] = [businessProfile]

export const SETTINGS: Record<string, SettingDefinition<any>> = Object.fromEntries(ALL.map(d => [d.key, d]))
