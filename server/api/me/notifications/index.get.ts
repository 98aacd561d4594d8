import { notificationsQuery } from '#shared/schemas/notifications'
import { listNotifications } from '../../../services/notifications'

/** The caller's deal events, unread first then newest first, with the e-mail switches; an admin, a party to no deal, gets none. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const query = await getValidatedQuery(event, validator(notificationsQuery))
  return listNotifications(useDb(), actor, query)
})
