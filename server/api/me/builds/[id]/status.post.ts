import { buildStatusAction } from '#shared/schemas/build'
import { idParams } from '#shared/schemas/common'
import { changeStatus } from '../../../../services/build-editor'

/** Publish (422 naming what is missing), unpublish, archive or restore one of the caller's builds. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { action } = await readValidatedBody(event, validator(buildStatusAction))
  return changeStatus(useDb(), shop, id, action)
})
