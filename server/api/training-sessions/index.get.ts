import { sessionListQuery } from '../../../shared/schemas/training'

// Sessions across the trainer's own clients (the admin: all), newest first, paged and filtered on the server, with
// each session's trial and outcome counts.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin', 'trainer')
  const query = getValidatedQueryParams(event, sessionListQuery)
  return listSessionsAcrossClients(user, query)
})
