import { idParams } from '#shared/schemas/common'
import { reviewSchema } from '#shared/schemas/reviews'
import { createReview } from '../../../services/reviews'

/** The order's racer reviews the shop, once, after the order is completed. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireOrderAccess(event, id, 'racer')
  const input = await readValidatedBody(event, validator(reviewSchema))
  setResponseStatus(event, 201)
  return createReview(useDb(), actor, id, input)
})
