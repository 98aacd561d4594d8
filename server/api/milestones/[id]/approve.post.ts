import { idParams } from '#shared/schemas/common'
import { approveMilestone } from '../../../services/milestones'

/** The racer approves submitted work; the payout to the shop follows. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  return approveMilestone(useDealContext(), actor, id)
})
