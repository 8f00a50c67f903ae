import type { users, clients, dogs, clientHandlers, invitations, auditLog, outbox } from '../../server/database/schema'

export type UserRow = typeof users.$inferSelect
export type ClientRow = typeof clients.$inferSelect
export type NewClient = typeof clients.$inferInsert
export type DogRow = typeof dogs.$inferSelect
export type ClientHandlerRow = typeof clientHandlers.$inferSelect
export type InvitationRow = typeof invitations.$inferSelect
export type AuditRow = typeof auditLog.$inferSelect
export type OutboxRow = typeof outbox.$inferSelect
