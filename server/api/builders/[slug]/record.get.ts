import { slugParams } from '#shared/schemas/common'
import { SCORE_EXPLAINED, recordScore } from '#shared/reviews/track-record'
import { shopRecord } from '../../../services/track-record'

/** A shop's track record, computed from its deals, each figure with its sample size. Public. */
export default defineEventHandler(async (event) => {
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const found = await shopRecord(useDb(), slug)
  if (!found) throw createError({ status: 404, message: 'No shop has that address.' })
  return { shop: found.shop.slug, record: found.deals.record, recordScore: recordScore(found.deals.record), scoreExplained: SCORE_EXPLAINED }
})
