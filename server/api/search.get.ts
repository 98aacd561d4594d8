import { searchQuery } from '#shared/schemas/search'
import { useSearchIndex } from '../services/search'

/** Published builds by words, displacement, power, band power and facets, from the embedded index. Public. */
export default defineEventHandler(async (event) => {
  const query = await getValidatedQuery(event, validator(searchQuery))
  const index = await useSearchIndex()
  return index.query(query)
})
