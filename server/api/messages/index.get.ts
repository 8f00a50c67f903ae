// The conversations the signed-in person can see, latest first, with unread counts.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return { rows: await listConversations(user) }
})
