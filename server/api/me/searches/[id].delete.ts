import { idParams } from '#shared/schemas/common'
import { deleteSavedSearch } from '../../../services/saved-searches'

/** Deletes one of the caller's saved searches; another user's answers 404. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  await deleteSavedSearch(useDb(), user.id, id)
  setResponseStatus(event, 204)
  return null
})
