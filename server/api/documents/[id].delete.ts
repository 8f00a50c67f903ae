import { idParams } from '../../../shared/schemas/common'

// Delete a document and its file: the trainer of the client and the admin (handlers 403).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, document } = await requireDocumentAccess(event, id, { write: true })
  return deleteClientDocument(user, document)
})
