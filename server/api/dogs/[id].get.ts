import { idParams } from '../../../shared/schemas/common'

// The dog's full profile: details, age, status history, health records with due flags, assessments.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, dog, client } = await requireDogAccess(event, id)
  return getDogProfile(user, dog, client)
})
