import { idParams } from '#shared/schemas/common'
import { quoteFieldsSchema } from '#shared/schemas/deals'
import { sendQuote } from '../../../services/deals'

/** The shop sends its quote, or a new revision of it. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireRequestAccess(event, id, 'builder')
  // Each field is checked here (400); a quote whose total is over the money limit is the service's 422.
  const input = await readValidatedBody(event, validator(quoteFieldsSchema))
  setResponseStatus(event, 201)
  return sendQuote(useDealContext(), actor, id, input)
})
