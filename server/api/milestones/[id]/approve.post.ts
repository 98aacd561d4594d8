import { idParams } from '#shared/schemas/common'
import { approveMilestone } from '../../../services/milestones'

/** The racer approves submitted work; the payout to the shop follows. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireMilestoneAccess(event, id, 'racer')
  return approveMilestone(useDealContext(), actor, id)
})
