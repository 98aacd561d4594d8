import { idParams } from '#shared/schemas/common'
import { evidenceReview } from '../../../services/verification'

/** One pull with its raw file, curves, declared and recomputed figures, check report and combination. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  return evidenceReview(useDb(), readUploadText, id)
})
