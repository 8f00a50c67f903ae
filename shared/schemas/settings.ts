import type { ZodType } from 'zod'

/**
 * Every business policy the admin can change, by key: its zod schema (used by the admin form and the route) and
 * its defaults (each default marked with its source where it is defined). Features list theirs in ./settings-all.ts.
 */
export interface SettingDefinition<T extends object = Record<string, unknown>> {
  key: string
  label: string
  description: string
  schema: ZodType<T>
  defaults: T
  /** Labels for the admin form, by dotted field path; otherwise the field name is spelled out. */
  fieldLabels?: Record<string, string>
}

/** "maxRollsPerBag" → "Max rolls per bag" */
export function spellOut(key: string): string {
  const words = key.replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase()
  return words.charAt(0).toUpperCase() + words.slice(1)
}

/** Names a policy; list the result in ./settings-all.ts (an explicit list: bundlers drop import-only side effects). */
export function defineSetting<T extends object>(key: string, def: Omit<SettingDefinition<T>, 'key'>): SettingDefinition<T> {
  return { key, ...def }
}
