import { idParams } from '#shared/schemas/common'
import { messageSchema } from '#shared/schemas/deals'
import { postMessage } from '../../../services/messages'

/** A message on the thread, from either party, with optional attachments. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireRequestAccess(event, id, 'party')
  const input = await readValidatedBody(event, validator(messageSchema))
  setResponseStatus(event, 201)
  return postMessage(useDealContext(), actor, id, input)
})
