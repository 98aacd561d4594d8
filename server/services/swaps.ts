import { and, eq, inArray } from 'drizzle-orm'
import type { CorrectionStandard } from '#shared/engine'
import { displacementCi } from '#shared/engine/geometry'
import type { SwapsQuery } from '#shared/schemas/swaps'
import { summarizeSwaps, type SwapSample, type SwapStats } from '#shared/swaps/stats'
import { builds, dynoPulls } from '../database/schema'
import type { Database } from '../database/types'
import { curvesForBuild, type ReadStoredText } from './curves'

/** Every swap figure is re-expressed under this one standard, from the raw pulls. */
export const SWAP_STANDARD: CorrectionStandard = 'SAE_J1349_2004'

export interface SwapReport extends SwapStats {
  change: SwapsQuery['change']
  standard: CorrectionStandard
  filters: { ciMin: number | null, ciMax: number | null, aspiration: string | null, fuel: string | null }
}

/**
 * The verified comparisons of one kind of change on published builds in the filters: both pulls of
 * each (the baseline and the variant) verified and corrected under SWAP_STANDARD. The curves come from
 * curvesForBuild, the one path from stored pulls to figures, so a change to that path changes these too.
 */
export async function swapSamples(db: Database, read: ReadStoredText, q: SwapsQuery): Promise<SwapSample[]> {
  const candidates = await db.selectDistinct({
    id: builds.id, slug: builds.slug, title: builds.title, boreIn: builds.boreIn, strokeIn: builds.strokeIn, cylinders: builds.cylinders,
    aspiration: builds.aspiration, fuel: builds.fuel,
  }).from(builds)
    .innerJoin(dynoPulls, eq(dynoPulls.buildId, builds.id))
    .where(and(
      eq(builds.status, 'published'),
      eq(dynoPulls.comparisonRole, 'variant'),
      eq(dynoPulls.changeKind, q.change),
      eq(dynoPulls.status, 'verified'),
      q.aspiration ? eq(builds.aspiration, q.aspiration) : undefined,
      q.fuel ? eq(builds.fuel, q.fuel) : undefined,
    ))
    .orderBy(builds.id)

  const inRange = candidates.flatMap((b) => {
    if (b.boreIn === null || b.strokeIn === null || b.cylinders === null) return []
    const ci = displacementCi(b.boreIn, b.strokeIn, b.cylinders)
    if ((q.ciMin !== undefined && ci < q.ciMin) || (q.ciMax !== undefined && ci > q.ciMax)) return []
    return [{ ...b, ci }]
  })
  if (inRange.length === 0) return []
  const statuses = new Map((await db.select({ id: dynoPulls.id, status: dynoPulls.status }).from(dynoPulls)
    .where(inArray(dynoPulls.buildId, inRange.map(b => b.id)))).map(p => [p.id, p.status]))

  const samples: SwapSample[] = []
  for (const b of inRange) {
    const curves = await curvesForBuild(db, read, b.id, b.slug, SWAP_STANDARD)
    const pull = (id: number) => curves.pulls.find(p => p.id === id)
    for (const c of curves.comparisons) {
      const before = pull(c.baselineId)
      const after = pull(c.variantId)
      if (c.changeKind !== q.change || !before || !after) continue
      if (statuses.get(before.id) !== 'verified' || statuses.get(after.id) !== 'verified') continue
      // Figures as observed cannot sit beside corrected ones.
      if (before.uncorrected || after.uncorrected) continue
      samples.push({
        slug: b.slug,
        title: b.title,
        ci: Math.round(b.ci),
        aspiration: b.aspiration ?? '',
        fuel: b.fuel ?? '',
        changeNote: c.changeNote,
        peakGainHp: Math.round((after.peaks.peakHp - before.peaks.peakHp) * 10) / 10,
        points: c.points.map(p => ({ rpm: p.rpm, hpDelta: p.hpDelta })),
      })
    }
  }
  return samples
}

/** The swap report for one kind of change: the sample, the gain distributions and the median delta curve. */
export async function swapReport(db: Database, read: ReadStoredText, q: SwapsQuery): Promise<SwapReport> {
  const samples = await swapSamples(db, read, q)
  const band = q.bandFrom !== undefined && q.bandTo !== undefined ? { from: q.bandFrom, to: q.bandTo } : null
  return {
    change: q.change,
    standard: SWAP_STANDARD,
    filters: { ciMin: q.ciMin ?? null, ciMax: q.ciMax ?? null, aspiration: q.aspiration ?? null, fuel: q.fuel ?? null },
    ...summarizeSwaps(samples, band),
  }
}
