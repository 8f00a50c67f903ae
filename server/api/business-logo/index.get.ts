import { BUSINESS_LOGO_KEY, businessLogoSchema } from '../../../shared/schemas/settings-identity'

// Which logo new documents print (null for none): signed-in people, for letterheads.
export default defineEventHandler(async (event) => {
  requireUser(event)
  return readSetting(BUSINESS_LOGO_KEY, businessLogoSchema, { logoId: null })
})
