import { changeOrderParams } from '#shared/schemas/deals'
import { acceptChangeOrder } from '../../../../../services/change-orders'

/** The racer accepts an open change order: the unpaid milestones give way to its milestones. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id, changeId } = await getValidatedRouterParams(event, validator(changeOrderParams))
  const { actor } = await requireOrderAccess(event, id, 'racer')
  return acceptChangeOrder(useDealContext(), actor, id, changeId)
})
