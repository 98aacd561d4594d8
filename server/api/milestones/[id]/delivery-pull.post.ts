import { idParams } from '#shared/schemas/common'
import { deliveryPullSchema } from '#shared/schemas/deals'
import { recordDeliveryPull } from '../../../services/milestones'

/** The shop sends the delivery pull (an uploaded pull file and its weather and geometry); answers the check report. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireMilestoneAccess(event, id, 'builder')
  const { fileId, ...fields } = await readValidatedBody(event, validator(deliveryPullSchema))
  setResponseStatus(event, 201)
  return recordDeliveryPull(useDealContext(), uploadStore(), actor, id, fileId, fields)
})
