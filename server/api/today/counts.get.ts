// The navigation's small counts: unread messages, and for staff the videos waiting for review.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return navigationCounts(user)
})
