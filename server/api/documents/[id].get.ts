import { idParams } from '../../../shared/schemas/common'
import { documentDownloadQuery } from '../../../shared/schemas/documents'

// Download a document: only through this route, for those who may see its client file.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { inline } = getValidatedQueryParams(event, documentDownloadQuery)
  const { document } = await requireDocumentAccess(event, id)
  return sendStoredFile(event, document, { inline })
})
