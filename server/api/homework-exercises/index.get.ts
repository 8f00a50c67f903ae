// The exercise library (trainers and the office): every exercise not archived, by title.
export default defineEventHandler(async (event) => {
  requireRole(event, 'trainer', 'admin')
  const all = getQuery(event).archived === '1'
  return { rows: await listHomeworkExercises({ includeArchived: all }) }
})
