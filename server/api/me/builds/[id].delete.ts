import { idParams } from '#shared/schemas/common'
import { deleteBuild } from '../../../services/build-editor'

/** Deletes one of the caller's builds with its pulls, photos and stored files. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  await deleteBuild(useDb(), uploadStore(), shop, id)
  setResponseStatus(event, 204)
  return null
})
