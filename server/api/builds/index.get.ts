import { paginationQuery } from '#shared/schemas/common'
import { listPublishedBuilds } from '../../services/listings'

/** Published builds, newest first. Public. */
export default defineEventHandler(async (event) => {
  const query = await getValidatedQuery(event, validator(paginationQuery))
  return listPublishedBuilds(useDb(), query)
})
