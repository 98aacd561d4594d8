import { z } from 'zod'
import { idSchema } from '#shared/schemas/common'
import { syncBuild } from '../../../services/search'

/**
 * Test mode only (TW_TEST_MODE=1, else 404), admins only: re-syncs one build's search entry, as the build
 * editor and the evidence review do after their writes, so tests can change rows and check search.
 */
export default defineEventHandler(async (event) => {
  if (process.env.TW_TEST_MODE !== '1') throw createError({ status: 404, message: 'Not found.' })
  await requireRole(event, 'admin')
  const { buildId } = await readValidatedBody(event, validator(z.strictObject({ buildId: idSchema })))
  return { result: await syncBuild(useDb(), readUploadText, buildId) }
})
