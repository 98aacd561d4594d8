import { idParams } from '#shared/schemas/common'
import { reviewSchema } from '#shared/schemas/reviews'
import { editReview } from '../../services/reviews'

/** The author edits a review within 14 days of writing it; the replaced version is kept. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const input = await readValidatedBody(event, validator(reviewSchema))
  await editReview(useDb(), actor, id, input, { siteUrl: dealSiteUrl() })
  // Reviews show on the build and shop pages: the cached public pages go at once.
  await invalidatePublicCache()
  return { ok: true }
})
