import { z } from 'zod'
import { idSchema, slugSchema } from '#shared/schemas/common'
import { photoFile } from '../../../../services/build-photos'

const params = z.object({ slug: slugSchema, id: idSchema })

/** One photo of a published build, as stored (its type was sniffed at upload). Public. */
export default defineEventHandler(async (event) => {
  const { slug, id } = await getValidatedRouterParams(event, validator(params))
  const photo = await photoFile(useDb(), { photoId: id, publishedSlug: slug })
  if (!photo) throw createError({ status: 404, message: 'That build has no such photo.' })
  return sendStoredFile(event, photo)
})
