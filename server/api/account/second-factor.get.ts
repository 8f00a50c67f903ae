// Whether this person uses a second factor, whether the office requires one, and how many recovery codes are left.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return secondFactorStatus(user)
})
