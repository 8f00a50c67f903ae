import { clientBillingSchema } from '../../../../shared/schemas/clients'
import { idParams } from '../../../../shared/schemas/common'

// Who the client's invoices are addressed to (the office only). Issued invoices keep the address they were issued with.
export default defineEventHandler(async (event) => {
  requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { user, client } = await requireClientAccess(event, id)
  const input = await readValidatedJson(event, clientBillingSchema)
  return updateClientBilling(user, client, input)
})
