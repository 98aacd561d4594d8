import { paginationQuery } from '#shared/schemas/common'
import { listPublishedBuilds } from '../../services/builds'

/** Published builds, newest first. Public; cached for anonymous visitors (server/utils/public-cache.ts). */
export default definePublicCachedHandler('builds-list', async (event) => {
  const query = await getValidatedQuery(event, validator(paginationQuery))
  return listPublishedBuilds(useDb(), query)
})
