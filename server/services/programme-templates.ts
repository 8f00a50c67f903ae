// Programme templates: the office creates, duplicates (with its fee schedule), renames and archives them. An archived
// template is offered for no new programme; clients already on it keep their programme, milestones and fees.
import { asc, eq, isNull, sql } from 'drizzle-orm'
import { clients, feeSchedules, programmeTemplates } from '../database/schema'
import type { TemplateUpdateInput } from '../../shared/schemas/training'
import type { AuthUser } from '../utils/authz'

/** The templates to start from (active ones; the office may ask for archived ones too), with how many clients use each. */
export async function listTemplates(includeArchived: boolean) {
  const db = useDb()
  const rows = await db.select({ t: programmeTemplates, clientsUsing: sql<number>`(select count(*) from ${clients} where ${clients.programmeTemplateId} = ${programmeTemplates.id})` })
    .from(programmeTemplates).where(includeArchived ? undefined : isNull(programmeTemplates.archivedAt))
    .orderBy(sql`${programmeTemplates.archivedAt} is not null`, sql`${programmeTemplates.isDefault} desc`, asc(programmeTemplates.name))
  return rows.map(r => ({ ...r.t, clientsUsing: Number(r.clientsUsing) }))
}

export async function createTemplate(user: AuthUser, input: TemplateUpdateInput) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.insert(programmeTemplates).values({ name: input.name, milestones: input.milestones }).returning()
    await logAudit(tx, { actorId: user.id, action: 'programme-template.created', entityType: 'programme-template', entityId: row!.id, data: { name: input.name, milestones: input.milestones.length } })
    return row!
  })
}

/** A copy of a template, with its milestones and its fee schedule, named "<name> (copy)". */
export async function duplicateTemplate(user: AuthUser, templateId: string) {
  return useDb().transaction(async (tx) => {
    const [source] = await tx.select().from(programmeTemplates).where(eq(programmeTemplates.id, templateId)).limit(1)
    if (!source) notFound('programme template')
    const name = `${source.name} (copy)`.slice(0, 80)
    const [row] = await tx.insert(programmeTemplates).values({ name, milestones: source.milestones }).returning()
    const [fees] = await tx.select().from(feeSchedules).where(eq(feeSchedules.templateId, templateId)).limit(1)
    if (fees) {
      const { id: _id, templateId: _t, createdAt: _c, updatedAt: _u, ...rest } = fees
      await tx.insert(feeSchedules).values({ ...rest, templateId: row!.id, updatedById: user.id })
    }
    await logAudit(tx, { actorId: user.id, action: 'programme-template.duplicated', entityType: 'programme-template', entityId: row!.id, data: { name, from: source.name, withFees: !!fees } })
    return row!
  })
}

/** Archives (or brings back) a template. Clients mid-programme keep it: their milestones and invoices are their own. */
export async function setTemplateArchived(user: AuthUser, templateId: string, archived: boolean) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(programmeTemplates).set({ archivedAt: archived ? new Date() : null }).where(eq(programmeTemplates.id, templateId)).returning()
    if (!row) notFound('programme template')
    const [using] = await tx.select({ n: sql<number>`count(*)` }).from(clients).where(eq(clients.programmeTemplateId, templateId))
    const clientsUsing = Number(using?.n ?? 0)
    await logAudit(tx, { actorId: user.id, action: archived ? 'programme-template.archived' : 'programme-template.restored', entityType: 'programme-template', entityId: templateId, data: { name: row.name, clientsKeepingIt: clientsUsing } })
    return { ...row, clientsUsing }
  })
}
