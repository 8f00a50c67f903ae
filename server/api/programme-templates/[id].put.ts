import { idParams } from '../../../shared/schemas/common'
import { templateUpdateSchema } from '../../../shared/schemas/training'

// The admin edits a programme template (programmes already started keep their own copy).
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const input = await readValidatedJson(event, templateUpdateSchema)
  return updateProgrammeTemplate(user, id, input)
})
