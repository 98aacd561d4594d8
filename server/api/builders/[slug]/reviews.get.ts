import { slugParams } from '#shared/schemas/common'
import { shopReviews } from '../../../services/reviews'

/** A shop's visible reviews with their summary (no average below three). Public. */
export default defineEventHandler(async (event) => {
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const list = await shopReviews(useDb(), slug)
  if (!list) throw createError({ status: 404, message: 'No shop has that address.' })
  return list
})
