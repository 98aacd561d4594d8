import { adminOverview } from '../../services/admin-overview'

/** The admin dashboard's figures: the evidence queue, the share of verified builds, disputes and payments. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return adminOverview(useDb())
})
