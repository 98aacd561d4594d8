import { idParams } from '#shared/schemas/common'
import { quoteSchema } from '#shared/schemas/deals'
import { sendQuote } from '../../../services/deals'

/** The shop sends its quote, or a new revision of it. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireRequestAccess(event, id, 'builder')
  const input = await readValidatedBody(event, validator(quoteSchema))
  setResponseStatus(event, 201)
  return sendQuote(useDealContext(), actor, id, input)
})
