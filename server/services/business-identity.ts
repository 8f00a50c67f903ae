// The business's logo (by content hash, never changed once stored, so an issued invoice keeps the logo it was
// issued with) and each client's billing name and address.
import { createHash } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { businessLogos, clients } from '../database/schema'
import { BUSINESS_LOGO_KEY } from '../../shared/schemas/settings-identity'
import type { BillingInput } from '../../shared/schemas/clients'
import type { AuthUser } from '../utils/authz'

type ClientRow = typeof clients.$inferSelect

/** Stores a (byte-checked) logo and makes it the one new documents print. */
export async function saveBusinessLogo(user: AuthUser, bytes: Buffer, mime: string) {
  const id = createHash('sha256').update(bytes).digest('hex')
  return useDb().transaction(async (tx) => {
    await tx.insert(businessLogos).values({ id, mime, bytes }).onConflictDoNothing()
    await writeSetting(tx, BUSINESS_LOGO_KEY, { logoId: id }, user)
    return { logoId: id, mime, bytes: bytes.length }
  })
}

/** New documents print no logo (documents already issued keep theirs). */
export async function removeBusinessLogo(user: AuthUser) {
  return useDb().transaction(tx => writeSetting(tx, BUSINESS_LOGO_KEY, { logoId: null }, user))
}

export async function readBusinessLogo(id: string) {
  const [row] = await useDb().select().from(businessLogos).where(eq(businessLogos.id, id)).limit(1)
  return row ?? null
}

/** Who the client's invoices are addressed to; empty fields fall back to the household's contact details. */
export async function updateClientBilling(user: AuthUser, client: ClientRow, input: BillingInput) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(clients).set({
      billingName: input.billingName || null, billingAddressLine: input.billingAddressLine || null, billingTown: input.billingTown || null,
      billingPostcode: input.billingPostcode || null, billingCountry: input.billingCountry || null,
    }).where(eq(clients.id, client.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'client.billing-updated', entityType: 'client', entityId: client.id, clientId: client.id, data: { name: 'Billing details changed' } })
    return row!
  })
}
