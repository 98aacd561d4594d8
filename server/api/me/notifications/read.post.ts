import { notificationsRead } from '#shared/schemas/notifications'
import { markNotificationsRead } from '../../../services/notifications'

/** Marks the caller's notifications read: all of them, or up to and including one event id. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const body = await readValidatedBody(event, validator(notificationsRead))
  return markNotificationsRead(useDb(), actor, 'upTo' in body ? body.upTo : null)
})
