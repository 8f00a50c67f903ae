import { idParams } from '../../../../shared/schemas/common'
import { dogPhotoSchema } from '../../../../shared/schemas/documents'
import { DOG_PHOTO_MAX_BYTES, DOG_PHOTO_TYPES } from '../../../../shared/utils/documents'

// Add or replace the dog's photo (multipart: file): the trainer of the dog's client and the admin; handlers 403.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog } = await requireDogForPhoto(event, id, { write: true })
  const form = await readUploadForm(event, DOG_PHOTO_MAX_BYTES)
  const { file } = validateUploadForm(form, dogPhotoSchema)
  const type = await detectUploadType(file.bytes, DOG_PHOTO_TYPES)
  return replaceDogPhoto(user, dog, file.bytes, type.mime)
})
