import { idParams } from '../../../../shared/schemas/common'

// The office copies a template with its milestones and fee schedule, to price a second programme from it.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const row = await duplicateTemplate(user, id)
  setResponseStatus(event, 201)
  return row
})
