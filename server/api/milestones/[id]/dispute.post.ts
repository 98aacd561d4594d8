import { idParams } from '#shared/schemas/common'
import { disputeSchema } from '#shared/schemas/deals'
import { disputeMilestone } from '../../../services/milestones'

/** The racer disputes a funded or submitted milestone; the deposit stays held. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { reason } = await readValidatedBody(event, validator(disputeSchema))
  await disputeMilestone(useDealContext(), actor, id, reason)
  return { ok: true }
})
