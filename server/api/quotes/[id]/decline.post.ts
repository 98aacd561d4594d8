import { idParams } from '#shared/schemas/common'
import { declineQuoteSchema } from '#shared/schemas/deals'
import { declineQuote } from '../../../services/deals'

/** The racer declines the current revision. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireQuoteAccess(event, id, 'racer')
  const { reason } = await readValidatedBody(event, validator(declineQuoteSchema))
  await declineQuote(useDealContext(), actor, id, reason)
  return { ok: true }
})
