import { checkIndex } from '../../../services/search'

/** Test mode only (TW_TEST_MODE=1, else 404): runs the search consistency check now and answers what it repaired. */
export default defineEventHandler(async () => {
  if (process.env.TW_TEST_MODE !== '1') throw createError({ status: 404, message: 'Not found.' })
  return checkIndex(useDb())
})
