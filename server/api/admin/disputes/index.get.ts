import { listDisputes } from '../../../services/admin-disputes'

/** Open disputes, oldest first, and the most recently settled ones. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return listDisputes(useDb())
})
