import { idParams } from '../../../../shared/schemas/common'

// A dog's measured reliability over all its sessions: overall, blind or not, per stage, and per session (the
// household reads it too; the trainer of the client; the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { dog, client } = await requireDogAccess(event, id)
  return getDogReliability(dog, client)
})
