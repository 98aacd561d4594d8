import { getDashboard } from '../../services/deals'

/** The signed-in user's dashboard: open requests, quotes and orders, with unread counts. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  return getDashboard(useDealContext(), actor)
})
