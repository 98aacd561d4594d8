import { count, desc, eq } from 'drizzle-orm'
import { displacementCi } from '../../shared/engine/geometry'
import type { OwnBuildRow } from '../../shared/types/auth'
import { shops, builds, dynoPulls, type Shop } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { recordBuildChanges } from './search-feed'

/** A shop's own builds for its dashboard, drafts and archived ones included, most recently changed first. */
export async function listOwnBuilds(db: Database, shopId: number): Promise<OwnBuildRow[]> {
  const rows = await db.select({ build: builds, pulls: count(dynoPulls.id) }).from(builds)
    .leftJoin(dynoPulls, eq(dynoPulls.buildId, builds.id))
    .where(eq(builds.shopId, shopId))
    .groupBy(builds.id)
    .orderBy(desc(builds.updatedAt), desc(builds.id))
  return rows.map(({ build, pulls }) => ({
    id: build.id,
    slug: build.slug,
    title: build.title,
    status: build.status,
    // A draft may not have its bore, stroke or cylinders yet.
    displacementCi: build.boreIn !== null && build.strokeIn !== null && build.cylinders !== null ? displacementCi(build.boreIn, build.strokeIn, build.cylinders) : null,
    peakHp: build.peakHp,
    peakTq: build.peakTq,
    verified: build.verifiedAt !== null,
    pulls,
    updatedAt: build.updatedAt.toISOString(),
  }))
}

/**
 * Changes a shop's name, region or description. The slug stays, so links to the shop keep working.
 * Every build of the shop shows its name and region (search results, build pages), so each build's
 * change goes to the feed in the same transaction: other instances re-index them and drop their cached
 * pages. Answers the shop as it now stands and the builds, for this instance's own hook after the commit.
 */
export async function updateShop(db: Database, shopId: number, patch: { shopName?: string, region?: string, bio?: string }): Promise<{ shop: Shop, buildIds: number[] }> {
  // Safe to repeat: it sets the same fields and records the same builds' changes again.
  return inRetriedTransaction(db, async (tx) => {
    await tx.update(shops).set(patch).where(eq(shops.id, shopId))
    const [updated] = await tx.select().from(shops).where(eq(shops.id, shopId))
    const shopBuilds = await tx.select({ id: builds.id }).from(builds).where(eq(builds.shopId, shopId))
    const buildIds = shopBuilds.map(b => b.id)
    // The feed's rows last (recordBuildChange's rule), one per build.
    await recordBuildChanges(tx, buildIds)
    return { shop: updated!, buildIds }
  })
}
