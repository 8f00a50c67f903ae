// A fee plan's instalments still to come (household: its own; trainer: their clients'; admin: all).
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return listUpcomingInstalments(user)
})
