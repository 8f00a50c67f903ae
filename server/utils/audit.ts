import { auditLog } from '../database/schema'

export interface AuditEntry {
  actorId: string | null
  action: string
  entityType: string
  entityId?: string | null
  clientId?: string | null
  data?: Record<string, unknown>
}

/** Records a privileged action, inside the caller's transaction so it lands with the change or not at all. */
export async function logAudit(tx: DbOrTx, entry: AuditEntry) {
  await tx.insert(auditLog).values({
    actorId: entry.actorId,
    action: entry.action,
    entityType: entry.entityType,
    entityId: entry.entityId ?? null,
    clientId: entry.clientId ?? null,
    data: entry.data ?? null,
  })
  // The security log gets who did what to which record (not the details, which stay in the audit row).
  logEvent('audit.action', { actorId: entry.actorId, action: entry.action, entityType: entry.entityType, entityId: entry.entityId ?? null, clientId: entry.clientId ?? null })
}
