import { swapsQuery } from '#shared/schemas/swaps'
import { swapReport } from '../services/swaps'

/** What one kind of change gains across the verified comparisons in a displacement range and band. Public. */
export default defineEventHandler(async (event) => {
  const query = await getValidatedQuery(event, validator(swapsQuery))
  return swapReport(useDb(), readUploadText, query)
})
