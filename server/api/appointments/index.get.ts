import { appointmentListQuery } from '../../../shared/schemas/schedule'

// The calendar's visits in a range of days (business time zone): a household its own, a trainer their clients',
// the office everyone's (filter by trainer or client).
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const q = getValidatedQueryParams(event, appointmentListQuery)
  return listAppointments(user, q)
})
