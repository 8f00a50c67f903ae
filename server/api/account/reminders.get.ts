
// The reminder e-mails that concern this person, each with their choice and whether the office sends it at all.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return reminderChoices(user)
})
