import { idParams } from '../../../../shared/schemas/common'
import { programmeCreateSchema } from '../../../../shared/schemas/training'

// Starts a client's programme from a template (the trainer or the admin).
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, programmeCreateSchema)
  await createClientProgramme(user, client, input.templateId)
  // Fees: the template's plan becomes the household's invoices (deposit issued now, instalments on their days), once.
  await createPlanInvoicesOnProgrammeStart(user, client, input.templateId)
  setResponseStatus(event, 201)
  return getClientProgramme(user, client)
})
