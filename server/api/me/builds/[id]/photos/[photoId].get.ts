import { z } from 'zod'
import { idSchema } from '#shared/schemas/common'
import { ownBuild } from '../../../../../services/own-build'
import { photoFile } from '../../../../../services/build-photos'

const params = z.object({ id: idSchema, photoId: idSchema })

/** A photo of one of the caller's builds, drafts included, for the editor. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id, photoId } = await getValidatedRouterParams(event, validator(params))
  const db = useDb()
  await ownBuild(db, shop, id)
  const photo = await photoFile(db, { photoId, buildId: id })
  if (!photo) throw createError({ status: 404, message: 'That build has no such photo.' })
  return sendStoredFile(event, photo)
})
