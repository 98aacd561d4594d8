import { idParams } from '#shared/schemas/common'
import { savedSearchPatch } from '#shared/schemas/saved-search'
import { updateSavedSearch } from '../../../services/saved-searches'
import { useSearchIndex } from '../../../services/search'

/** Renames one of the caller's saved searches and/or switches its e-mail; another user's answers 404. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const patch = await readValidatedBody(event, validator(savedSearchPatch))
  return updateSavedSearch(useDb(), await useSearchIndex(), user.id, id, patch)
})
