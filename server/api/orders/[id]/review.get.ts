import { idParams } from '#shared/schemas/common'
import { orderReview } from '../../../services/reviews'

/** An order's review for its parties (and admins): the review, and whether the caller may write or answer one. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireOrderAccess(event, id, 'any')
  return orderReview(useDb(), actor, id)
})
