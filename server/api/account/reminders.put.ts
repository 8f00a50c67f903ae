import { reminderPreferencesSchema } from '../../../shared/schemas/schedule'

// Switches reminder e-mails on or off for the signed-in person.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const input = await readValidatedJson(event, reminderPreferencesSchema)
  return saveReminderChoices(user, input)
})
