import { z } from 'zod'
import { LOGO_MAX_BYTES, LOGO_TYPES } from '../../../shared/utils/documents'

// The office uploads the business's logo (multipart, field "file"): a PNG or JPEG by its bytes, at most 512 KB.
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const form = await readUploadForm(event, LOGO_MAX_BYTES)
  const { file } = validateUploadForm(form, z.object({}))
  const type = await detectUploadType(file.bytes, LOGO_TYPES)
  const saved = await saveBusinessLogo(user, file.bytes, type.mime)
  setResponseStatus(event, 201)
  return saved
})
