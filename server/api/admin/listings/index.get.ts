import { adminBuildsQuery } from '#shared/schemas/admin'
import { listBuilds } from '../../../services/moderation'

/** Every build, any status, searchable by title, address or shop, for moderation. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const query = await getValidatedQuery(event, validator(adminBuildsQuery))
  return listBuilds(useDb(), query)
})
