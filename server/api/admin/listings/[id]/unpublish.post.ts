import { unpublishBuildSchema } from '#shared/schemas/admin'
import { idParams } from '#shared/schemas/common'
import { takeDownBuild } from '../../../../services/admin-decisions'

/** Takes a published build down with a reason that is e-mailed to the shop; one audit row. Admins only. */
export default defineEventHandler(async (event) => {
  const admin = await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { reason } = await readValidatedBody(event, validator(unpublishBuildSchema))
  return takeDownBuild(adminContext(event), admin.id, id, reason)
})
