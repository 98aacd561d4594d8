import { signOutSchema } from '#shared/schemas/auth'
import { revokeSessions } from '../../services/accounts'

/**
 * Ends the account's sessions on every device. With scope "others" the caller gets a fresh cookie
 * and stays signed in here; with "everywhere" the caller's cookie goes too. Signed-in users only.
 */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { scope } = await readValidatedBody(event, validator(signOutSchema))
  const version = await revokeSessions(useDb(), user.id)
  if (scope === 'others') {
    await renewSession(event, version)
    return { scope, message: 'Every other session of your account is signed out; this one stays signed in.' }
  }
  endSession(event)
  return { scope, message: 'Your account is signed out everywhere, here too.' }
})
