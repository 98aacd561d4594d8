import { idParams } from '#shared/schemas/common'
import { messagesQuery } from '#shared/schemas/deals'
import { pollThread } from '../../../services/messages'

/** The thread's messages after `after` (the page polls this every few seconds); marks the reader present and up to date. */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireRequestAccess(event, id)
  const { after } = await getValidatedQuery(event, validator(messagesQuery))
  return pollThread(useDealContext(), actor, id, after)
})
