import { eq } from 'drizzle-orm'
import type { ZodType } from 'zod'
import { businessSettings } from '../database/schema'
import type { AuthUser } from '../utils/authz'

/**
 * A business policy: the stored value merged over its defaults, validated by its shared zod schema. A stored
 * value that no longer validates (an older shape) falls back to the defaults rather than breaking pages.
 */
export async function readSetting<T extends object>(key: string, schema: ZodType<T, any, any>, defaults: T, db: DbOrTx = useDb()): Promise<T> {
  const [row] = await db.select().from(businessSettings).where(eq(businessSettings.key, key)).limit(1)
  if (!row) return defaults
  const parsed = schema.safeParse({ ...defaults, ...row.value })
  return parsed.success ? parsed.data : defaults
}

/** Stores a policy (already validated by the caller's schema) and records who changed what. */
export async function writeSetting<T extends object>(tx: Tx, key: string, value: T, actor: AuthUser): Promise<T> {
  const [before] = await tx.select().from(businessSettings).where(eq(businessSettings.key, key)).limit(1)
  await tx.insert(businessSettings).values({ key, value: value as Record<string, unknown>, updatedById: actor.id })
    .onConflictDoUpdate({ target: businessSettings.key, set: { value: value as Record<string, unknown>, updatedById: actor.id, updatedAt: new Date() } })
  await logAudit(tx, { actorId: actor.id, action: 'setting.updated', entityType: 'setting', entityId: key, data: { before: before?.value ?? null, after: value as Record<string, unknown> } })
  return value
}
