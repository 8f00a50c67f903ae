import { asc, count, eq } from 'drizzle-orm'
import { z } from 'zod'
import { ROLES } from '../../../shared/utils/enums'

const query = z.object({ role: z.enum(ROLES).optional() })

export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { role } = getValidatedQueryParams(event, query)
  const { users, clients } = schema
  const caseload = useDb().select({ trainerId: clients.trainerId, n: count().as('n') }).from(clients).groupBy(clients.trainerId).as('caseload')
  const rows = await useDb().select({
    id: users.id, name: users.name, email: users.email, role: users.role,
    disabledAt: users.disabledAt, lastSignInAt: users.lastSignInAt, createdAt: users.createdAt, clients: caseload.n,
  }).from(users).leftJoin(caseload, eq(caseload.trainerId, users.id))
    .where(role ? eq(users.role, role) : undefined).orderBy(asc(users.role), asc(users.name))
  return rows.map(r => ({ ...r, clients: r.clients ?? 0 }))
})
