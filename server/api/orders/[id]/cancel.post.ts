import { idParams } from '#shared/schemas/common'
import { cancelOrderSchema } from '#shared/schemas/deals'
import { cancelOrder } from '../../../services/milestones'

/** Either party cancels an active order: held deposits are refunded, unpaid milestones cancelled. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireOrderAccess(event, id, 'party')
  const { reason } = await readValidatedBody(event, validator(cancelOrderSchema))
  return cancelOrder(useDealContext(), actor, id, reason)
})
