import { idParams } from '#shared/schemas/common'
import { disputeReview } from '../../../services/admin-disputes'

/** One dispute by its milestone's id: the order, the milestone with its proof and payments, the thread and the decision if made. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  return disputeReview(useDealContext(), await requireDealActor(event), id)
})
