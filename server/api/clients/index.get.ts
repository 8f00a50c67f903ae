import { clientListQuery } from '../../../shared/schemas/clients'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const query = getValidatedQueryParams(event, clientListQuery)
  return listClients(user, query)
})
