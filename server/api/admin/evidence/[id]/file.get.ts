import { idParams } from '#shared/schemas/common'
import { pullFile } from '../../../../services/verification'

/** The pull's raw file exactly as the shop uploaded it, as a download. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  return sendStoredDownload(event, await pullFile(useDb(), id, 'pull'))
})
