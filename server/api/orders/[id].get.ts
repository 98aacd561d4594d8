import { idParams } from '#shared/schemas/common'
import { getOrderView } from '../../services/milestones'

/** An order with its milestone tracker, payments, documents and history; its parties (and admins) only. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireOrderAccess(event, id)
  return getOrderView(useDealContext(), actor, id)
})
