// A build's stored headline figures (the columns cards, search, the shop's figures and alerts read)
// kept equal to the one headline rule of shared/pulls/headline.ts.
import { and, eq, inArray } from 'drizzle-orm'
import { headlinePull, type HeadlineBasis } from '#shared/pulls/headline'
import type { PeakFigures } from '#shared/types/admin'
import { builds, dynoPulls } from '../database/schema'
import type { Tx } from './build-files'

export interface StoredHeadline extends PeakFigures {
  pullId: number | null
  basis: HeadlineBasis | null
  verifiedAt: Date | null
}

/**
 * Writes the build's headline figures and checked mark from its pulls by the headline rule: the
 * strongest verified pull, else the strongest awaiting pull whose report has no failure, else none.
 * Returns what it wrote. Call it inside the transaction that changed a pull; a first verification is
 * stamped `now` (the decision's own moment, so the audit row and the build agree).
 */
export async function refreshHeadline(tx: Tx, buildId: number, now = new Date()): Promise<StoredHeadline> {
  const rows = await tx.select({ id: dynoPulls.id, status: dynoPulls.status, summary: dynoPulls.summary, checks: dynoPulls.checks }).from(dynoPulls)
    .where(and(eq(dynoPulls.buildId, buildId), inArray(dynoPulls.status, ['submitted', 'verified'])))
  const chosen = headlinePull(rows)
  const s = chosen?.pull.summary
  const [build] = await tx.select({ verifiedAt: builds.verifiedAt }).from(builds).where(eq(builds.id, buildId))
  const verifiedAt = rows.some(r => r.status === 'verified') ? (build?.verifiedAt ?? now) : null
  const figures: PeakFigures = { peakHp: s?.peakHp ?? null, peakHpRpm: s?.peakHpRpm ?? null, peakTq: s?.peakTq ?? null, peakTqRpm: s?.peakTqRpm ?? null }
  await tx.update(builds).set({ ...figures, verifiedAt }).where(eq(builds.id, buildId))
  return { ...figures, pullId: chosen?.pull.id ?? null, basis: chosen?.basis ?? null, verifiedAt }
}
