import { idParams } from '../../../../shared/schemas/common'
import { paymentProblemResolveSchema } from '../../../../shared/schemas/invoices'

// The office marks a payment problem as dealt with, saying how (the office only).
export default defineEventHandler(async (event) => {
  const user = requireRole(event, 'admin')
  const { id } = getValidatedParams(event, idParams)
  const { resolution } = await readValidatedJson(event, paymentProblemResolveSchema)
  return resolvePaymentProblem(user, id, resolution)
})
