import { idParams } from '#shared/schemas/common'
import { acceptQuoteSchema } from '#shared/schemas/deals'
import { acceptQuote } from '../../../services/deals'

/** The racer accepts the current revision; answers the new order's id. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireQuoteAccess(event, id, 'racer')
  const { revision } = await readValidatedBody(event, validator(acceptQuoteSchema))
  setResponseStatus(event, 201)
  return acceptQuote(useDealContext(), actor, id, revision)
})
