import { idParams } from '#shared/schemas/common'
import { disputeSchema } from '#shared/schemas/deals'
import { disputeMilestone } from '../../../services/milestones'

/** The racer disputes a funded or submitted milestone; the deposit stays held. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireMilestoneAccess(event, id, 'racer')
  const { reason } = await readValidatedBody(event, validator(disputeSchema))
  await disputeMilestone(useDealContext(), actor, id, reason)
  return { ok: true }
})
