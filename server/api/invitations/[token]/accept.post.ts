import { z } from 'zod'
import { acceptInvitationSchema } from '../../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const { token } = getValidatedParams(event, z.object({ token: z.string().min(20).max(200) }))
  const { password, name } = await readValidatedJson(event, acceptInvitationSchema)
  const user = await acceptInvitation(token, password, name)
  await startSession(event, user)
  return { user: toAuthUser(user) }
})
