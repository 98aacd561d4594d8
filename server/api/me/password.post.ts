import { hash } from '@node-rs/argon2'
import { passwordChangeSchema } from '#shared/schemas/auth'
import { setPasswordHash } from '../../services/accounts'

/**
 * Sets a new password. The current one is asked for, except when the account has none yet or the
 * session began with an e-mailed link minutes ago (how a forgotten password is replaced).
 */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { currentPassword, newPassword } = await readValidatedBody(event, validator(passwordChangeSchema))
  await confirmCurrentPassword(event, user, currentPassword)
  // A new password ends every other session; the caller's own continues on a fresh cookie.
  await renewSession(event, await setPasswordHash(useDb(), user.id, await hash(newPassword)))
  return { message: 'Your password is changed. Any other sessions of your account are signed out.' }
})
