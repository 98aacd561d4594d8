import { unreadCounts } from '../../services/messages'

/** Unread messages per thread, for the navigation badge. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  return unreadCounts(useDb(), actor)
})
