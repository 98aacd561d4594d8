import { averagePower } from '#shared/engine'
import { compareQuery } from '#shared/schemas/curves'
import type { CompareRow } from '#shared/types/builds'
import { curvesForBuild, publishedBuildId } from '../services/curves'
import { getPublishedBuild } from '../services/builds'

/**
 * Up to four published builds side by side under one standard: each build's combination and price, its
 * headline pull (the one rule of shared/pulls/headline.ts) for the overlay, and with a band
 * (`bandFrom`/`bandTo`) its average power across it, or null when the pull does not cover the band. Public.
 */
export default defineEventHandler(async (event) => {
  const { builds, standard, bandFrom, bandTo } = await getValidatedQuery(event, validator(compareQuery))
  const db = useDb()
  const out: CompareRow[] = []
  for (const slug of [...new Set(builds)]) {
    const id = await publishedBuildId(db, slug)
    const build = id ? await getPublishedBuild(db, slug) : null
    if (!id || !build) throw createError({ status: 404, message: `No published build has the address "${slug}".` })
    const curves = await curvesForBuild(db, readUploadText, id, slug, standard)
    const pull = curves.pulls.find(p => p.id === curves.headlineId) ?? null
    let bandAvgHp: number | null = null
    if (pull && bandFrom !== undefined && bandTo !== undefined && pull.points[0]!.rpm <= bandFrom && pull.points.at(-1)!.rpm >= bandTo) {
      bandAvgHp = Math.round(averagePower(pull.points, bandFrom, bandTo) * 10) / 10
    }
    const { parts: _parts, pulls: _pulls, photos: _photos, ...detail } = build
    out.push({ build: detail, pull, bandAvgHp })
  }
  return { standard, band: bandFrom !== undefined && bandTo !== undefined ? { from: bandFrom, to: bandTo } : null, builds: out }
})
