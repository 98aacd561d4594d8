import { quoteRequestSchema } from '#shared/schemas/deals'
import { createRequest } from '../../services/deals'

/** A racer asks a shop for a quote. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'racer')
  const actor = await requireDealActor(event)
  const input = await readValidatedBody(event, validator(quoteRequestSchema))
  setResponseStatus(event, 201)
  return createRequest(useDealContext(), actor, input)
})
