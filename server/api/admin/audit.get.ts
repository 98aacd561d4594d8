import { auditQuery } from '#shared/schemas/admin'
import { listAudit } from '../../services/audit'

/** The audit log, newest first, filtered by action, entity, actor and days. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const query = await getValidatedQuery(event, validator(auditQuery))
  return listAudit(useDb(), query)
})
