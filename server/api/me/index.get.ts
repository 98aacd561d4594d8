import { getProfile } from '../../services/accounts'

/** The signed-in user's account: name, e-mail, role, units and shop. Signed-in users only. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const profile = await getProfile(useDb(), user.id)
  if (!profile) throw createError({ status: 401, message: 'Sign in to continue.' })
  return profile
})
