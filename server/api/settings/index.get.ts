import { SETTINGS } from '../../../shared/schemas/settings-all'

export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  return Promise.all(Object.entries(SETTINGS).map(async ([key, def]) => ({
    key, label: def.label, description: def.description, value: await readSetting(key, def.schema, def.defaults), defaults: def.defaults,
  })))
})
