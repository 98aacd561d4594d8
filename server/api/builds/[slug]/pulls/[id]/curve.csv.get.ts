import { z } from 'zod'
import { idSchema, slugSchema } from '#shared/schemas/common'
import { standardQuery } from '#shared/schemas/curves'
import { curveCsv, curvesForBuild, publishedBuildId } from '../../../../../services/curves'

const params = z.object({ slug: slugSchema, id: idSchema })

/** One pull of a published build as CSV under `?standard=`. Public. */
export default defineEventHandler(async (event) => {
  const { slug, id } = await getValidatedRouterParams(event, validator(params))
  const { standard } = await getValidatedQuery(event, validator(standardQuery))
  const db = useDb()
  const buildId = await publishedBuildId(db, slug)
  if (!buildId) throw createError({ status: 404, message: 'No published build has that address.' })
  const curves = await curvesForBuild(db, readUploadText, buildId, slug, standard, 'full')
  const pull = curves.pulls.find(p => p.id === id)
  if (!pull) throw createError({ status: 404, message: 'That build has no such pull.' })
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', attachmentDisposition(`${slug}-pull-${id}-${pull.standard.toLowerCase()}.csv`))
  return curveCsv(pull)
})
