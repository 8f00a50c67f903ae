import { intakeSchema } from '../../../shared/schemas/clients'

export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'trainer', 'admin')
  const input = await readValidatedJson(event, intakeSchema)
  const client = await createClient(user, input)
  setResponseStatus(event, 201)
  return client
})
