// A new feed address; the old one answers 404 from now on.
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return { url: await renewCalendarFeed(user) }
})
