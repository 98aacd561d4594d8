import { slugParams } from '#shared/schemas/common'
import { standardQuery } from '#shared/schemas/curves'
import { curvesForBuild, publishedBuildId } from '../../../services/curves'

/** Every pull of a published build recomputed from its raw file under `?standard=`. Public; cached for anonymous visitors (server/utils/public-cache.ts). */
export default definePublicCachedHandler('build-curves', async (event) => {
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const { standard } = await getValidatedQuery(event, validator(standardQuery))
  const db = useDb()
  const id = await publishedBuildId(db, slug)
  if (!id) throw createError({ status: 404, message: 'No published build has that address.' })
  return curvesForBuild(db, readUploadText, id, slug, standard)
})
