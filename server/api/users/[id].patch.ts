import { eq } from 'drizzle-orm'
import { idParams } from '../../../shared/schemas/common'
import { userUpdateSchema } from '../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const admin = requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const input = await readValidatedJson(event, userUpdateSchema)
  if (id === admin.id && input.disabled) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'You cannot disable your own account.' })
  }
  const { users } = schema
  const updated = await useDb().transaction(async (tx) => {
    const [row] = await tx.update(users).set({
      ...(input.name !== undefined ? { name: input.name } : {}),
      ...(input.disabled !== undefined ? { disabledAt: input.disabled ? new Date() : null } : {}),
    }).where(eq(users.id, id)).returning()
    if (!row) notFound('account')
    if (input.disabled) await endAllSessions(tx, id)
    await logAudit(tx, { actorId: admin.id, action: input.disabled ? 'user.disabled' : input.disabled === false ? 'user.enabled' : 'user.updated', entityType: 'user', entityId: id, data: input })
    return row
  })
  return { id: updated.id, name: updated.name, email: updated.email, role: updated.role, disabledAt: updated.disabledAt }
})
