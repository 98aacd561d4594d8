import { z } from 'zod'
import { hasFilters } from '../search/saved'
import { searchFilters } from './search'

/** How many searches one account may keep. */
export const MAX_SAVED_SEARCHES = 20
export const SAVED_SEARCH_NAME_MAX = 80

const name = z.string({ error: 'name is text' }).trim()
  .min(1, 'Give the search a name')
  .max(SAVED_SEARCH_NAME_MAX, `A name is at most ${SAVED_SEARCH_NAME_MAX} characters`)

/** POST /api/me/searches: a name and the search's filters, checked by the same schema as GET /api/search (less sort and page). */
export const savedSearchCreate = z.strictObject({
  name,
  query: searchFilters.refine(hasFilters, 'Set at least one filter or some words before saving a search'),
})

/** PATCH /api/me/searches/[id]: a new name, the e-mail switched on or off, or both. */
export const savedSearchPatch = z.strictObject({
  name: name.optional(),
  emailOn: z.boolean({ error: 'emailOn is true or false' }).optional(),
}).refine(v => v.name !== undefined || v.emailOn !== undefined, 'Send a new name, emailOn, or both')

export type SavedSearchCreate = z.infer<typeof savedSearchCreate>
export type SavedSearchPatch = z.infer<typeof savedSearchPatch>
