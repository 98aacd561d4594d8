import { profilePatchSchema } from '#shared/schemas/auth'
import { getProfile, updateProfile } from '../../services/accounts'

/** Changes the signed-in user's name or unit preference. Signed-in users only. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const patch = await readValidatedBody(event, validator(profilePatchSchema))
  const db = useDb()
  await updateProfile(db, user.id, patch)
  return (await getProfile(db, user.id))!
})
