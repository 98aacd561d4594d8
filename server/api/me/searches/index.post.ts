import { savedSearchCreate } from '#shared/schemas/saved-search'
import { createSavedSearch } from '../../../services/saved-searches'
import { useSearchIndex } from '../../../services/search'

/** Saves a search (a name and the filters of GET /api/search less sort and page). 409 past the cap or for a repeat. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const input = await readValidatedBody(event, validator(savedSearchCreate))
  const saved = await createSavedSearch(useDb(), await useSearchIndex(), user.id, input)
  setResponseStatus(event, 201)
  return saved
})
