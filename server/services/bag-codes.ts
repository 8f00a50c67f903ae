// Bag-code prefixes reserved for phones (shared/utils/bag-codes.ts): each prefix is handed out once, so codes made
// on phones with no signal never clash.
import { count, eq } from 'drizzle-orm'
import { bagCodePrefixes } from '../database/schema'
import { DEVICE_PREFIXES, choosePrefix } from '../../shared/utils/bag-codes'
import type { AuthUser } from '../utils/authz'

/**
 * Prefixes one person may hold: one per phone or browser they collect on, and a new one each time a phone's storage
 * is cleared or its 961 numbers are used (our own choice; stops one account from using up the 29,791 prefixes).
 */
export const MAX_PREFIXES_PER_PERSON = 50

export async function reserveBagCodePrefix(user: AuthUser) {
  const db = useDb()
  return db.transaction(async (tx) => {
    const [held] = await tx.select({ n: count() }).from(bagCodePrefixes).where(eq(bagCodePrefixes.reservedById, user.id))
    if ((held?.n ?? 0) >= MAX_PREFIXES_PER_PERSON) {
      throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: `You already hold ${MAX_PREFIXES_PER_PERSON} bag-code prefixes, one for each phone you collected on. Ask the office to look into it; until then codes are made without one.` })
    }
    const taken = new Set((await tx.select({ p: bagCodePrefixes.prefix }).from(bagCodePrefixes)).map(r => r.p))
    let prefix: string | null = null
    while (!prefix) {
      const candidate = choosePrefix(taken)
      if (!candidate) throw createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: `All ${DEVICE_PREFIXES} bag-code prefixes are in use. Codes are made without one for now.` })
      const inserted = await tx.insert(bagCodePrefixes).values({ prefix: candidate, reservedById: user.id }).onConflictDoNothing().returning()
      if (inserted.length) prefix = candidate
      else taken.add(candidate) // reserved a moment ago by another phone
    }
    await logAudit(tx, { actorId: user.id, action: 'bag-code-prefix.reserved', entityType: 'bag-code-prefix', entityId: prefix, data: { prefix } })
    return { prefix }
  })
}
