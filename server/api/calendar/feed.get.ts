// The signed-in person's private calendar feed address (made on first use).
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return { url: await calendarFeedUrl(user) }
})
