// The programme templates a client's programme can start from (trainers and the admin).
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin', 'trainer')
  return { rows: await listProgrammeTemplates() }
})
