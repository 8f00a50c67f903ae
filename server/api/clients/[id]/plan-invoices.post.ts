import { idParams } from '../../../../shared/schemas/common'
import { planInvoicesSchema } from '../../../../shared/schemas/fee-schedules'

// "Create invoices from the plan" for a client whose programme already runs (the office only); once per plan.
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const { templateId, startDate } = await readValidatedJson(event, planInvoicesSchema)
  const created = await createPlanInvoices(user, client, templateId, startDate, { whenMissing: 'refuse' })
  setResponseStatus(event, 201)
  return { rows: created ?? [] }
})
