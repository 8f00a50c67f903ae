import type { AuthUser } from '../../utils/authz'

export default defineEventHandler(async (event) => {
  const user = event.context.authUser as AuthUser | undefined
  if (user) {
    // Signing out ends this person's sessions on every device.
    await useDb().transaction(async (tx) => {
      await endAllSessions(tx, user.id)
      await logAudit(tx, { actorId: user.id, action: 'signed-out', entityType: 'user', entityId: user.id })
    })
  }
  await clearUserSession(event)
  return { signedOut: true }
})
