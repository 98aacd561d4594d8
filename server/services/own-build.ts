import { and, eq } from 'drizzle-orm'
import { createError } from 'h3'
import { builds, type Build } from '../database/schema'
import type { Database } from '../database/types'
import type { Tx } from './build-files'

/** The caller's shop, as the shop guard returns it. */
export interface ShopRef {
  id: number
  userId: number
}

/**
 * The caller's own build, locked for update inside a transaction when `tx` is one.
 * Ownership is in the WHERE clause; a miss answers 403 when the build is another shop's published
 * build (visible to everyone) and 404 otherwise (drafts and archived builds stay unseen).
 */
export async function ownBuild(db: Database | Tx, shop: ShopRef, buildId: number, lock = false): Promise<Build> {
  const query = db.select().from(builds).where(and(eq(builds.id, buildId), eq(builds.shopId, shop.id))).limit(1)
  const [row] = lock ? await query.for('update') : await query
  if (row) return row
  const [other] = await db.select({ status: builds.status }).from(builds).where(eq(builds.id, buildId)).limit(1)
  if (other?.status === 'published') throw createError({ status: 403, message: 'That build belongs to another shop; only its shop can change it.' })
  throw createError({ status: 404, message: 'You have no build with that id.' })
}
