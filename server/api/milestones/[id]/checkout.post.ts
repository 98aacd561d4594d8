import { idParams } from '#shared/schemas/common'
import { startCheckout } from '../../../services/payments'

/** The racer is sent to pay a milestone: the Checkout Session's url (the same one for a double click). */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireMilestoneAccess(event, id, 'racer')
  return startCheckout(useDealContext(), actor, id)
})
