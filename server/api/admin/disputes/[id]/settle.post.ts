import { settleDisputeSchema } from '#shared/schemas/admin'
import { idParams } from '#shared/schemas/common'
import type { SettleDisputeResult } from '#shared/types/admin'
import { settleDispute } from '../../../../services/milestones'

/**
 * Settles a disputed milestone by refund (to the racer, through the payment service) or release (to
 * the shop), with a note that both parties get by e-mail and in the thread; one audit row in the
 * same transaction. 409 for a milestone that is not disputed. Admins only.
 */
export default defineEventHandler(async (event): Promise<SettleDisputeResult> => {
  await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { outcome, note } = await readValidatedBody(event, validator(settleDisputeSchema))
  const result = await settleDispute(useDealContext(), await requireDealActor(event), id, outcome, note)
  return { milestoneId: id, outcome, ...result }
})
