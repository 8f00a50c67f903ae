import { templateUpdateSchema } from '../../../shared/schemas/training'

// The office creates a programme template (its milestones; the fees are set under Fees).
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const input = await readValidatedJson(event, templateUpdateSchema)
  const row = await createTemplate(user, input)
  setResponseStatus(event, 201)
  return row
})
