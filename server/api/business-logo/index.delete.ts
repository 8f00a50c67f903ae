// The office removes the logo from new documents (issued ones keep theirs).
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  return removeBusinessLogo(user)
})
