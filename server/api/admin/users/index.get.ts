import { adminUserQuery } from '#shared/schemas/auth'
import { listUsers } from '../../../services/accounts'

/** Every account, searchable by name or e-mail and filterable by role. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const query = await getValidatedQuery(event, validator(adminUserQuery))
  return listUsers(useDb(), query)
})
