import { adminListingsQuery } from '#shared/schemas/admin'
import { listListings } from '../../../services/moderation'

/** Every listing, any status, searchable by title, address or shop, for moderation. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const query = await getValidatedQuery(event, validator(adminListingsQuery))
  return listListings(useDb(), query)
})
