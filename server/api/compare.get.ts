import type { CorrectionStandard } from '#shared/engine'
import { compareQuery } from '#shared/schemas/curves'
import type { BuildSummary, CurvePull } from '#shared/types/listings'
import { curvesForBuild, publishedBuildId } from '../services/curves'
import { getPublishedBuild } from '../services/listings'

/** Up to four published builds with their headline pull under one standard, for the overlay. Public. */
export default defineEventHandler(async (event) => {
  const { builds, standard } = await getValidatedQuery(event, validator(compareQuery))
  const db = useDb()
  const out: { build: BuildSummary, pull: CurvePull | null }[] = []
  for (const slug of [...new Set(builds)]) {
    const id = await publishedBuildId(db, slug)
    const build = id ? await getPublishedBuild(db, slug) : null
    if (!id || !build) throw createError({ status: 404, message: `No published build has the address "${slug}".` })
    const curves = await curvesForBuild(db, readUploadText, id, slug, standard as CorrectionStandard)
    const { parts: _parts, pulls: _pulls, photos: _photos, ...summary } = build
    out.push({ build: summary, pull: curves.pulls[0] ?? null })
  }
  return { standard, builds: out }
})
