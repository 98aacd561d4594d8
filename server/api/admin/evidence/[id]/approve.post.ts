import { approveEvidenceSchema } from '#shared/schemas/admin'
import { idParams } from '#shared/schemas/common'
import { approveEvidence } from '../../../../services/admin-decisions'

/** Verifies a pull: the build gets its checked mark and headline figures; one audit row. Admins only. */
export default defineEventHandler(async (event) => {
  const admin = await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { note } = await readValidatedBody(event, validator(approveEvidenceSchema))
  return approveEvidence(adminContext(event), admin.id, id, note)
})
