import { idParams } from '#shared/schemas/common'
import { pullFile } from '../../../../services/verification'

/** The dyno sheet (image or PDF) the shop attached to the pull, when there is one. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  return sendStoredDownload(event, await pullFile(useDb(), id, 'sheet'))
})
