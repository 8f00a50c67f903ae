import { idParams } from '../../../../shared/schemas/common'
import { messageCreateSchema } from '../../../../shared/schemas/schedule'
import { DOCUMENT_MAX_BYTES, DOCUMENT_TYPES } from '../../../../shared/utils/documents'
import { isJsonContentType } from '../../../../shared/utils/request-guard'

// Writes in the household's conversation: JSON ({ body }) or multipart (body and one photo or PDF, checked by its
// bytes). The household's handlers, its trainer and the office.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  if ((getRequestHeader(event, 'content-type') ?? '').startsWith('multipart/form-data')) {
    const form = await readUploadForm(event, DOCUMENT_MAX_BYTES)
    const { file, input } = validateUploadForm(form, messageCreateSchema)
    const type = await detectUploadType(file.bytes, DOCUMENT_TYPES)
    setResponseStatus(event, 201)
    return sendHouseholdMessage(user, client, input, { ...file, contentType: type.mime })
  }
  if (!isJsonContentType(getRequestHeader(event, 'content-type'))) {
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: 'Send the message as JSON, or as a multipart form with its photo or PDF.' })
  }
  const input = await readValidatedJson(event, messageCreateSchema)
  setResponseStatus(event, 201)
  return sendHouseholdMessage(user, client, input)
})
