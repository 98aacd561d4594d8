import { z } from 'zod'
import { idSchema } from '#shared/schemas/common'
import { deletePull } from '../../../../../services/evidence-uploads'

const params = z.object({ id: idSchema, pullId: idSchema })

/** Deletes one pull of the caller's build and its stored files. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id, pullId } = await getValidatedRouterParams(event, validator(params))
  await deletePull(useDb(), uploadStore(), shop, id, pullId)
  setResponseStatus(event, 204)
  return null
})
