import { adminUserPatchSchema } from '#shared/schemas/auth'
import { idParams } from '#shared/schemas/common'
import { getAdminUserRow, makeAdmin, setSuspended } from '../../../services/accounts'

/** Suspends or restores an account, or raises it to admin; each change leaves an audit row. Admins only. */
export default defineEventHandler(async (event) => {
  const admin = await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const change = await readValidatedBody(event, validator(adminUserPatchSchema))
  const db = useDb()
  if (!(await getAdminUserRow(db, id))) throw createError({ status: 404, message: 'No account has that id.' })
  if (change.role === 'admin') await makeAdmin(db, admin.id, id)
  if (change.suspended !== undefined) await setSuspended(db, admin.id, id, change.suspended)
  return (await getAdminUserRow(db, id))!
})
