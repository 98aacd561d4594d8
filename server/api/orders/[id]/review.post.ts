import { idParams } from '#shared/schemas/common'
import { reviewSchema } from '#shared/schemas/reviews'
import { createReview } from '../../../services/reviews'

/** The order's racer reviews the shop, once, after the order is completed. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireOrderAccess(event, id, 'racer')
  const input = await readValidatedBody(event, validator(reviewSchema))
  const created = await createReview(useDb(), actor, id, input, { siteUrl: dealSiteUrl() })
  // Reviews show on the build and shop pages: the cached public pages go at once.
  await invalidatePublicCache()
  setResponseStatus(event, 201)
  return created
})
