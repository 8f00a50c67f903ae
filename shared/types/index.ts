import type { users, clients, dogs, clientHandlers, invitations, auditLog, outbox } from '../../server/database/schema'

export type UserRow = typeof users.$inferSelect
export type ClientRow = typeof clients.$inferSelect
export type NewClient = typeof clients.$inferInsert
export type DogRow = typeof dogs.$inferSelect
export type ClientHandlerRow = typeof clientHandlers.$inferSelect
export type InvitationRow = typeof invitations.$inferSelect
export type AuditRow = typeof auditLog.$inferSelect
export type OutboxRow = typeof outbox.$inferSelect

/** A row as it arrives over JSON: dates become ISO strings. */
export type Jsonified<T> = {
  [K in keyof T]: T[K] extends Date ? string : T[K] extends Date | null ? string | null : T[K]
}
