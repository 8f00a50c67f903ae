export default defineEventHandler((event) => {
  // Staff who must first set up a second factor are told so (the pages send them to their account page).
  return { user: requireUser(event), mustEnrolSecondFactor: !!event.context.mustEnrolSecondFactor }
})
