import { idParams } from '../../../../shared/schemas/common'
import { templateArchiveSchema } from '../../../../shared/schemas/training'

// The office archives a template (or brings it back). Clients mid-programme keep it; it is offered for no new one.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { archived } = await readValidatedJson(event, templateArchiveSchema)
  return setTemplateArchived(user, id, archived)
})
