import { idParams } from '#shared/schemas/common'
import { hideReviewSchema } from '#shared/schemas/reviews'
import { hideReview } from '../../../../services/reviews'

/** Hides a review from the public pages with a reason; one audit row. Admins only. */
export default defineEventHandler(async (event) => {
  const admin = await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { reason } = await readValidatedBody(event, validator(hideReviewSchema))
  await hideReview(useDb(), admin.id, id, reason)
  // Reviews show on the build and shop pages: the cached public pages go at once.
  await invalidatePublicCache()
  return { ok: true }
})
