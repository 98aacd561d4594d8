import { notificationSettingsPatch } from '#shared/schemas/notifications'
import { updateEmailSwitches } from '../../../services/notifications'

/** Switches kinds of deal e-mail on or off for the caller; answers every switch as it now stands. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const patch = await readValidatedBody(event, validator(notificationSettingsPatch))
  return updateEmailSwitches(useDb(), actor, patch)
})
