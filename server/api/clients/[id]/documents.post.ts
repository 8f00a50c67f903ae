import { idParams } from '../../../../shared/schemas/common'
import { documentUploadSchema } from '../../../../shared/schemas/documents'
import { DOCUMENT_MAX_BYTES, DOCUMENT_TYPES } from '../../../../shared/utils/documents'

// Upload a document (multipart: file, kind, optional title). The trainer, the admin and the household's handlers
// may upload (a handler sends e.g. the dog's vaccination record). The type is decided by the file's bytes.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const form = await readUploadForm(event, DOCUMENT_MAX_BYTES)
  const { file, input } = validateUploadForm(form, documentUploadSchema)
  const type = await detectUploadType(file.bytes, DOCUMENT_TYPES)
  const document = await createClientDocument(user, client.id, file, type.mime, input)
  setResponseStatus(event, 201)
  return document
})
