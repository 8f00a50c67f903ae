import { z } from 'zod'
import { SETTINGS } from '../../../shared/schemas/settings-all'

// Policies are read by every signed-in person (handlers see the collection rules they must follow).
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { key } = getValidatedParams(event, z.object({ key: z.string().max(64).refine(k => k in SETTINGS) }))
  const def = SETTINGS[key]!
  return { key, label: def.label, description: def.description, value: await readSetting(key, def.schema, def.defaults), defaults: def.defaults }
})
