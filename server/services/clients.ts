import { and, asc, count, desc, eq, like, or, type SQL } from 'drizzle-orm'
import { alias } from 'drizzle-orm/sqlite-core'
import { clientHandlers, clients, dogs, users } from '../database/schema'
import type { ClientListQuery } from '../../shared/schemas/clients'
import type { AuthUser } from '../utils/authz'

const trainer = alias(users, 'trainer')

const SORT_COLUMNS = {
  household: clients.householdName,
  person: clients.personName,
  condition: clients.condition,
  status: clients.status,
  started: clients.programmeStartedOn,
  updated: clients.updatedAt,
  trainer: trainer.name,
} as const

/** One page of the clients this user may see, sorted and filtered in SQL. */
export async function listClients(user: AuthUser, q: ClientListQuery) {
  const db = useDb()
  const filters: (SQL | undefined)[] = [clientScope(user)]
  if (q.q) {
    const pattern = `%${q.q.replace(/[\\%_]/g, c => `\\${c}`)}%`
    filters.push(or(like(clients.householdName, pattern), like(clients.personName, pattern), like(dogs.name, pattern)))
  }
  if (q.condition) filters.push(eq(clients.condition, q.condition))
  if (q.status) filters.push(eq(clients.status, q.status))
  if (q.trainerId) filters.push(eq(clients.trainerId, q.trainerId))
  const where = and(...filters)
  const order = q.dir === 'asc' ? asc(SORT_COLUMNS[q.sort]) : desc(SORT_COLUMNS[q.sort])
  const base = db.select({
    id: clients.id,
    householdName: clients.householdName,
    personName: clients.personName,
    condition: clients.condition,
    status: clients.status,
    programmeStartedOn: clients.programmeStartedOn,
    trainerId: clients.trainerId,
    trainerName: trainer.name,
    dogName: dogs.name,
    updatedAt: clients.updatedAt,
  }).from(clients)
    .innerJoin(trainer, eq(trainer.id, clients.trainerId))
    .leftJoin(dogs, eq(dogs.clientId, clients.id))
    .where(where)
  const [rows, [total]] = await Promise.all([
    base.orderBy(order, asc(clients.id)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(clients).leftJoin(dogs, eq(dogs.clientId, clients.id)).innerJoin(trainer, eq(trainer.id, clients.trainerId)).where(where),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

export async function getClientFile(user: AuthUser, client: typeof clients.$inferSelect) {
  const db = useDb()
  const [trainerRow] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.id, client.trainerId))
  const handlers = await db.select({ id: users.id, name: users.name, email: users.email, relationship: clientHandlers.relationship })
    .from(clientHandlers).innerJoin(users, eq(users.id, clientHandlers.userId)).where(eq(clientHandlers.clientId, client.id))
  const dogRows = await db.select().from(dogs).where(eq(dogs.clientId, client.id))
  return { client, trainer: trainerRow ?? null, handlers, dogs: dogRows, canEdit: user.role !== 'handler' }
}
