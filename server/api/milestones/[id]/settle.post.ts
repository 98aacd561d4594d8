import { idParams } from '#shared/schemas/common'
import { settleSchema } from '#shared/schemas/deals'
import { settleDispute } from '../../../services/milestones'

/** An admin settles a dispute by refund or release. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireMilestoneAccess(event, id)
  const { outcome, note } = await readValidatedBody(event, validator(settleSchema))
  return settleDispute(useDealContext(), actor, id, outcome, note)
})
