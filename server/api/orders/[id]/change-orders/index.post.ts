import { idParams } from '#shared/schemas/common'
import { changeOrderSchema } from '#shared/schemas/deals'
import { sendChangeOrder } from '../../../../services/change-orders'

/** The shop sends a change order for the rest of an order with a refunded milestone; answers its id. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireOrderAccess(event, id, 'builder')
  const input = await readValidatedBody(event, validator(changeOrderSchema))
  setResponseStatus(event, 201)
  return sendChangeOrder(useDealContext(), actor, id, input)
})
