import { idParams } from '../../../../shared/schemas/common'

// The dog's photo, for anyone who may see the dog's client file; 404 when there is none.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { dog } = await requireDogForPhoto(event, id)
  return sendDogPhoto(event, dog)
})
