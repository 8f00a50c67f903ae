import { and, asc, count, desc, eq, exists, isNull, lt, or, sql, type SQL } from 'drizzle-orm'
import { alias } from 'drizzle-orm/sqlite-core'
import { auditLog, clientHandlers, clients, dogs, invitations, users } from '../database/schema'
import type { ClientListQuery, IntakeInput } from '../../shared/schemas/clients'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

type ClientRow = typeof clients.$inferSelect
const trainer = alias(users, 'trainer')

// The household's dog shown on the roster: its first-recorded dog (households rarely have two).
const firstDogName = sql<string | null>`(select ${dogs.name} from ${dogs} where ${dogs.clientId} = ${clients.id} order by ${dogs.createdAt}, ${dogs.id} limit 1)`

const SORT_COLUMNS = {
  household: clients.householdName,
  person: clients.personName,
  dog: firstDogName,
  condition: clients.condition,
  status: clients.status,
  started: clients.programmeStartedOn,
  updated: clients.updatedAt,
  trainer: trainer.name,
} as const

/** One page of the clients this user may see, sorted, filtered and counted in SQL. */
export async function listClients(user: AuthUser, q: ClientListQuery) {
  const db = useDb()
  const filters: (SQL | undefined)[] = [clientScope(user)]
  if (q.q) {
    const pattern = `%${q.q.replace(/[\\%_]/g, c => `\\${c}`)}%`
    const dogMatch = db.select({ one: sql`1` }).from(dogs).where(and(eq(dogs.clientId, clients.id), sql`${dogs.name} like ${pattern} escape '\\'`))
    filters.push(or(sql`${clients.householdName} like ${pattern} escape '\\'`, sql`${clients.personName} like ${pattern} escape '\\'`, exists(dogMatch)))
  }
  if (q.condition) filters.push(eq(clients.condition, q.condition))
  if (q.status) filters.push(eq(clients.status, q.status))
  if (q.trainerId) filters.push(eq(clients.trainerId, q.trainerId))
  const where = and(...filters)
  const column = SORT_COLUMNS[q.sort]
  const order = q.dir === 'asc' ? asc(column) : desc(column)
  // Empty values (no dog, not started) sort last in either direction.
  const [rows, [total]] = await Promise.all([
    db.select({
      id: clients.id,
      householdName: clients.householdName,
      personName: clients.personName,
      condition: clients.condition,
      status: clients.status,
      programmeStartedOn: clients.programmeStartedOn,
      trainerId: clients.trainerId,
      trainerName: trainer.name,
      dogName: firstDogName,
      updatedAt: clients.updatedAt,
    }).from(clients).innerJoin(trainer, eq(trainer.id, clients.trainerId)).where(where)
      .orderBy(sql`${column} is null`, order, asc(clients.id)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(clients).innerJoin(trainer, eq(trainer.id, clients.trainerId)).where(where),
  ])
  const extras = await rosterExtras(rows.map(r => r.id))
  return { rows: rows.map(r => ({ ...r, extras: extras.get(r.id) ?? {} })), total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

export async function getClientFile(user: AuthUser, client: ClientRow) {
  const db = useDb()
  const [[trainerRow], handlers, dogRows, pending] = await Promise.all([
    db.select({ id: users.id, name: users.name, email: users.email, phone: users.phone }).from(users).where(eq(users.id, client.trainerId)),
    db.select({ id: users.id, name: users.name, email: users.email, phone: users.phone, relationship: clientHandlers.relationship })
      .from(clientHandlers).innerJoin(users, eq(users.id, clientHandlers.userId)).where(eq(clientHandlers.clientId, client.id)).orderBy(asc(users.name)),
    db.select().from(dogs).where(eq(dogs.clientId, client.id)).orderBy(asc(dogs.createdAt)),
    user.role === 'handler'
      ? Promise.resolve([])
      : db.select({ id: invitations.id, name: invitations.name, email: invitations.email, expiresAt: invitations.expiresAt }).from(invitations)
          .where(and(eq(invitations.clientId, client.id), sql`${invitations.acceptedAt} is null`, sql`${invitations.revokedAt} is null`, sql`${invitations.expiresAt} > ${Date.now()}`)),
  ])
  return {
    client: user.role === 'handler' ? { ...client, notes: null } : client,
    trainer: trainerRow ?? null,
    handlers,
    pendingInvitations: pending,
    dogs: dogRows,
    canEdit: user.role !== 'handler',
  }
}

async function requireActiveTrainer(tx: Tx, trainerId: string) {
  const [row] = await tx.select().from(users).where(and(eq(users.id, trainerId), eq(users.role, 'trainer'), sql`${users.disabledAt} is null`)).limit(1)
  if (!row) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'Choose an active trainer.', data: { fieldErrors: { trainerId: 'Choose an active trainer.' } } })
  }
  return row
}

/** Intake: the file, its trainer, and (optionally) the first handler's invitation, all or nothing. */
export async function createClient(user: AuthUser, input: IntakeInput) {
  const trainerId = user.role === 'trainer' ? user.id : input.trainerId
  if (!trainerId) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'Choose the trainer for this client.', data: { fieldErrors: { trainerId: 'Choose the trainer for this client.' } } })
  }
  const { trainerId: _t, inviteHandler, handlerName, handlerEmail, handlerRelationship, ...file } = input
  return useDb().transaction(async (tx) => {
    await requireActiveTrainer(tx, trainerId)
    const [client] = await tx.insert(clients).values({ ...file, trainerId, status: 'intake' }).returning()
    await logAudit(tx, { actorId: user.id, action: 'client.created', entityType: 'client', entityId: client!.id, clientId: client!.id, data: { householdName: client!.householdName } })
    if (inviteHandler && handlerName && handlerEmail) {
      await createInvitationIn(tx, user, { role: 'handler', clientId: client!.id, email: handlerEmail, name: handlerName, relationship: handlerRelationship })
    }
    return client!
  })
}

/** Applies a change to the file and records which fields changed (old and new values). */
export async function updateClient(user: AuthUser, client: ClientRow, changes: Partial<ClientRow>, action = 'client.updated') {
  const changed = Object.entries(changes).filter(([k, v]) => v !== undefined && (client as Record<string, unknown>)[k] !== v)
  if (!changed.length) return client
  const set = Object.fromEntries(changed) as Partial<ClientRow>
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(clients).set(set).where(eq(clients.id, client.id)).returning()
    await logAudit(tx, {
      actorId: user.id, action, entityType: 'client', entityId: client.id, clientId: client.id,
      data: { fields: changed.map(([k]) => k), ...(changed.some(([k]) => k === 'status') ? { from: client.status, to: set.status } : {}) },
    })
    return row!
  })
}

export async function removeHandler(user: AuthUser, clientId: string, handlerId: string) {
  return useDb().transaction(async (tx) => {
    const removed = await tx.delete(clientHandlers).where(and(eq(clientHandlers.clientId, clientId), eq(clientHandlers.userId, handlerId))).returning()
    if (!removed.length) notFound('handler on this client file')
    const [h] = await tx.select({ name: users.name }).from(users).where(eq(users.id, handlerId))
    await logAudit(tx, { actorId: user.id, action: 'handler.removed', entityType: 'user', entityId: handlerId, clientId, data: { name: h?.name } })
    return { clientId, userId: handlerId }
  })
}

/** Moves a client to another trainer; both trainers and the household's handlers are told by e-mail. */
export async function reassignClient(admin: AuthUser, client: ClientRow, trainerId: string, note: string | null) {
  if (client.trainerId === trainerId) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'This client already has that trainer.', data: { fieldErrors: { trainerId: 'This client already has that trainer.' } } })
  }
  return useDb().transaction(async (tx) => {
    const next = await requireActiveTrainer(tx, trainerId)
    const [prev] = await tx.select().from(users).where(eq(users.id, client.trainerId))
    const [row] = await tx.update(clients).set({ trainerId }).where(eq(clients.id, client.id)).returning()
    // Visits still to come move to the new trainer's diary; past ones stay with who held them.
    await moveFutureAppointments(tx, client.id, trainerId)
    const handlers = await householdHandlers(tx, client.id)
    const extra = note ? [`Note from the office: ${note}`] : []
    const link = { label: 'Open the client file', url: appUrl(`/trainer/clients/${client.id}`) }
    await queueEmail(tx, { to: next.email, ...composeEmail({ subject: `${client.householdName} is now on your roster`, greeting: `Hello ${next.name},`, paragraphs: [`${admin.name} has moved ${client.householdName} to you${prev ? ` from ${prev.name}` : ''}.`, ...extra], action: link }) })
    if (prev) await queueEmail(tx, { to: prev.email, ...composeEmail({ subject: `${client.householdName} has moved to ${next.name}`, greeting: `Hello ${prev.name},`, paragraphs: [`${admin.name} has moved ${client.householdName} to ${next.name}. The file is no longer on your roster.`, ...extra] }) })
    for (const h of handlers) {
      await queueEmail(tx, { to: h.email, ...composeEmail({ subject: `Your trainer is now ${next.name}`, greeting: `Hello ${h.name},`, paragraphs: [`From today ${next.name} is the trainer for ${client.householdName}. Your records, samples and progress stay exactly as they are.`, `You can reach ${next.name} at ${next.email}.`] }) })
    }
    await logAudit(tx, { actorId: admin.id, action: 'client.reassigned', entityType: 'client', entityId: client.id, clientId: client.id, data: { from: prev?.name, to: next.name, note } })
    return row!
  })
}

/** The client's activity timeline, newest first, from the audit log. */
export async function clientActivity(clientId: string, opts: { before?: number, limit: number }) {
  const rows = await useDb().select({
    id: auditLog.id, action: auditLog.action, entityType: auditLog.entityType, entityId: auditLog.entityId,
    data: auditLog.data, createdAt: auditLog.createdAt, actorName: users.name, actorRole: users.role,
  }).from(auditLog).leftJoin(users, eq(users.id, auditLog.actorId))
    .where(and(eq(auditLog.clientId, clientId), opts.before ? lt(auditLog.id, opts.before) : undefined))
    .orderBy(desc(auditLog.id)).limit(opts.limit + 1)
  const more = rows.length > opts.limit
  const items = rows.slice(0, opts.limit)
  return { items, nextBefore: more ? items[items.length - 1]!.id : null }
}


/** The household's handlers (the people e-mails about it go to); `activeOnly` leaves out disabled accounts. */
export function householdHandlers(db: DbOrTx, clientId: string, opts: { activeOnly?: boolean } = {}) {
  return db.select({ id: users.id, email: users.email, name: users.name }).from(clientHandlers)
    .innerJoin(users, eq(users.id, clientHandlers.userId))
    .where(and(eq(clientHandlers.clientId, clientId), opts.activeOnly ? isNull(users.disabledAt) : undefined))
}
