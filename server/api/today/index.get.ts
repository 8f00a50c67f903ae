// "What needs me now" for the signed-in person's role.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  if (user.role === 'admin') return { role: 'admin' as const, office: await officeToday(user), trainer: null, household: null }
  if (user.role === 'trainer') return { role: 'trainer' as const, trainer: await trainerToday(user), office: null, household: null }
  return { role: 'handler' as const, household: await householdToday(user), office: null, trainer: null }
})
