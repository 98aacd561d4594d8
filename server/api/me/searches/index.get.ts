import { listSavedSearches } from '../../../services/saved-searches'
import { useSearchIndex } from '../../../services/search'

/** The caller's saved searches, each with how many published builds match now. Signed-in users only. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  return listSavedSearches(useDb(), await useSearchIndex(), user.id)
})
