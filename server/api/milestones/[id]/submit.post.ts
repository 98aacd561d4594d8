import { idParams } from '#shared/schemas/common'
import { submitMilestoneSchema } from '#shared/schemas/deals'
import { submitMilestone } from '../../../services/milestones'

/** The shop submits a funded milestone with its proof (and, when guaranteed, its delivery pull). */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireMilestoneAccess(event, id, 'builder')
  const input = await readValidatedBody(event, validator(submitMilestoneSchema))
  await submitMilestone(useDealContext(), actor, id, input)
  return { ok: true }
})
