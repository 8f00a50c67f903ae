export default defineEventHandler((event) => {
  return { user: requireUser(event) }
})
