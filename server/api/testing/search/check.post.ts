import { checkIndex } from '../../../services/search'

/** Test mode only (TW_TEST_MODE=1, else 404), admins only: runs the search consistency check now and answers what it repaired. */
export default defineEventHandler(async (event) => {
  if (process.env.TW_TEST_MODE !== '1') throw createError({ status: 404, message: 'Not found.' })
  await requireRole(event, 'admin')
  return checkIndex(useDb(), readUploadText)
})
