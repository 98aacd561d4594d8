import { unpublishListingSchema } from '#shared/schemas/admin'
import { idParams } from '#shared/schemas/common'
import { takeDownListing } from '../../../../services/admin-decisions'

/** Takes a published listing down with a reason that is e-mailed to the shop; one audit row. Admins only. */
export default defineEventHandler(async (event) => {
  const admin = await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { reason } = await readValidatedBody(event, validator(unpublishListingSchema))
  return takeDownListing(adminContext(event), admin.id, id, reason)
})
