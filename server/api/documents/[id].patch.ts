import { idParams } from '../../../shared/schemas/common'
import { documentPatchSchema } from '../../../shared/schemas/documents'

// Rename a document or change its kind: the trainer of the client and the admin (handlers 403).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, document } = await requireDocumentAccess(event, id, { write: true })
  const input = await readValidatedJson(event, documentPatchSchema)
  return updateClientDocument(user, document, input)
})
