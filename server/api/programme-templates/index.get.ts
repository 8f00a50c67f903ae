import { templateListQuery } from '../../../shared/schemas/training'

// The programme templates a client's programme can start from (trainers and the admin); the admin may also ask for
// the archived ones (?archived=1), with how many clients use each.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin', 'trainer')
  const { archived } = getValidatedQueryParams(event, templateListQuery)
  return { rows: await listTemplates(user.role === 'admin' && archived === '1') }
})
