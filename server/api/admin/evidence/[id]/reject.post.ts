import { rejectEvidenceSchema } from '#shared/schemas/admin'
import { idParams } from '#shared/schemas/common'
import { rejectEvidence } from '../../../../services/admin-decisions'

/** Rejects a pull with a reason that is e-mailed to the shop; one audit row. Admins only. */
export default defineEventHandler(async (event) => {
  const admin = await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { reason } = await readValidatedBody(event, validator(rejectEvidenceSchema))
  return rejectEvidence(adminContext(event), admin.id, id, reason)
})
