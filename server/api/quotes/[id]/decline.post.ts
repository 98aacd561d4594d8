import { idParams } from '#shared/schemas/common'
import { declineQuoteSchema } from '#shared/schemas/deals'
import { declineQuote } from '../../../services/deals'

/** The racer declines the current revision. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { reason } = await readValidatedBody(event, validator(declineQuoteSchema))
  await declineQuote(useDealContext(), actor, id, reason)
  return { ok: true }
})
