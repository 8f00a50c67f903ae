import { z } from 'zod'
import { SETTINGS } from '../../../shared/schemas/settings-all'

export default defineEventHandler(async (event) => {
  const admin = requireRole(event, 'admin')
  const { key } = getValidatedParams(event, z.object({ key: z.string().max(64).refine(k => k in SETTINGS) }))
  const def = SETTINGS[key]!
  const value = await readValidatedJson(event, def.schema)
  return { key, value: await useDb().transaction(tx => writeSetting(tx, key, value, admin)) }
})
