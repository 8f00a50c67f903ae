import { idParams } from '../../../../shared/schemas/common'
import { programmePreviewQuery } from '../../../../shared/schemas/training'

// Before a programme starts: exactly what its template's fee plan would invoice and e-mail, and when (staff).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { client } = await requireClientAccess(event, id, { staff: true })
  const { templateId } = getValidatedQueryParams(event, programmePreviewQuery)
  return previewProgrammeBilling(client, templateId)
})
