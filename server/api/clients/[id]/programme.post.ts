import { idParams } from '../../../../shared/schemas/common'
import { programmeStartSchema } from '../../../../shared/schemas/training'

// Starts a client's programme from a template (the trainer or the admin). With billing 'plan' (the default) the
// template's fee plan becomes the household's invoices (the deposit issued and e-mailed now, instalments on their
// days), once; with 'none' nothing is invoiced and the office bills by hand.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id, { staff: true })
  const input = await readValidatedJson(event, programmeStartSchema)
  await createClientProgramme(user, client, input.templateId)
  if (input.billing === 'plan') await createPlanInvoicesOnProgrammeStart(user, client, input.templateId)
  setResponseStatus(event, 201)
  return getClientProgramme(user, client)
})
