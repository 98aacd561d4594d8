import { evidenceQueue } from '../../../services/verification'

/** Pulls awaiting a check, oldest first, with their flagged checks and any build a duplicate matches. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return evidenceQueue(useDb())
})
