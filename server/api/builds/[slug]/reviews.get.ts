import { slugParams } from '#shared/schemas/common'
import { buildReviews } from '../../../services/reviews'

/** The visible reviews of orders that came from this build. Public. */
export default defineEventHandler(async (event) => {
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const list = await buildReviews(useDb(), slug)
  if (!list) throw createError({ status: 404, message: 'No published build has that address.' })
  return list
})
