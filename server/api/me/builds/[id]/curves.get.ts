import { idParams } from '#shared/schemas/common'
import { standardQuery } from '#shared/schemas/curves'
import { curvesForBuild } from '../../../../services/curves'
import { ownBuild } from '../../../../services/own-build'

/** The curves of one of the caller's builds (drafts included) under `?standard=`, for the editor's chart. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { standard } = await getValidatedQuery(event, validator(standardQuery))
  const db = useDb()
  const build = await ownBuild(db, shop, id)
  return curvesForBuild(db, readUploadText, build.id, build.slug, standard)
})
