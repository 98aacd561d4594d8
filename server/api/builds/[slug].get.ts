import { slugParams } from '#shared/schemas/common'
import { getPublishedBuild } from '../../services/builds'

/** One published build with its combination, parts list and pulls. Public; drafts answer 404. */
export default definePublicCachedHandler('build', async (event) => {
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const build = await getPublishedBuild(useDb(), slug)
  if (!build) throw createError({ status: 404, message: 'No published build has that address.' })
  return build
})
