import { changeOrderParams, declineQuoteSchema } from '#shared/schemas/deals'
import { declineChangeOrder } from '../../../../../services/change-orders'

/** The racer declines an open change order; the order stays as it was. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id, changeId } = await getValidatedRouterParams(event, validator(changeOrderParams))
  const { actor } = await requireOrderAccess(event, id, 'racer')
  const { reason } = await readValidatedBody(event, validator(declineQuoteSchema))
  await declineChangeOrder(useDealContext(), actor, id, changeId, reason)
  return { ok: true }
})
