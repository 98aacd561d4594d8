import { z } from 'zod'
import { idSchema } from '#shared/schemas/common'
import { removePhoto } from '../../../../../services/build-photos'

const params = z.object({ id: idSchema, photoId: idSchema })

/** Removes a photo of the caller's build and its stored file. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id, photoId } = await getValidatedRouterParams(event, validator(params))
  await removePhoto(useDb(), uploadStore(), shop, id, photoId)
  setResponseStatus(event, 204)
  return null
})
