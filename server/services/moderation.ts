import { createError } from 'h3'
import { and, count, desc, eq, inArray, like, or, type SQL } from 'drizzle-orm'
import type { AdminBuildsQuery } from '../../shared/schemas/admin'
import type { AdminBuildRow } from '../../shared/types/admin'
import type { Page } from '../../shared/types/builds'
import { auditLog, shops, builds, dynoPulls, users } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { writeAudit } from './audit'
import { recordBuildChange } from './search-feed'

const likePattern = (text: string) => `%${text.replace(/[\\%_]/g, c => `\\${c}`)}%`

/** Every build for the moderation page, newest change first, searchable by title, address or shop. */
export async function listBuilds(db: Database, query: AdminBuildsQuery): Promise<Page<AdminBuildRow>> {
  const filters: SQL[] = []
  if (query.status) filters.push(eq(builds.status, query.status))
  if (query.q) {
    const p = likePattern(query.q)
    filters.push(or(like(builds.title, p), like(builds.slug, p), like(shops.shopName, p))!)
  }
  const where = filters.length ? and(...filters) : undefined
  const [rows, totals] = await Promise.all([
    db.select({ build: builds, shopSlug: shops.slug, shopName: shops.shopName }).from(builds)
      .innerJoin(shops, eq(shops.id, builds.shopId))
      .where(where)
      .orderBy(desc(builds.updatedAt), desc(builds.id))
      .limit(query.perPage).offset((query.page - 1) * query.perPage),
    db.select({ n: count() }).from(builds).innerJoin(shops, eq(shops.id, builds.shopId)).where(where),
  ])
  const ids = rows.map(r => r.build.id)
  const [pullCounts, takedowns] = ids.length
    ? await Promise.all([
        db.select({ buildId: dynoPulls.buildId, status: dynoPulls.status, n: count() }).from(dynoPulls)
          .where(inArray(dynoPulls.buildId, ids)).groupBy(dynoPulls.buildId, dynoPulls.status),
        db.select({ entityId: auditLog.entityId, at: auditLog.createdAt, note: auditLog.note, by: users.name }).from(auditLog)
          .leftJoin(users, eq(users.id, auditLog.actorId))
          .where(and(eq(auditLog.entityType, 'build'), eq(auditLog.action, 'listing.unpublish'), inArray(auditLog.entityId, ids)))
          .orderBy(desc(auditLog.createdAt), desc(auditLog.id)),
      ])
    : [[], []]
  return {
    total: totals[0]?.n ?? 0,
    page: query.page,
    perPage: query.perPage,
    items: rows.map(({ build, shopSlug, shopName }) => {
      const pulls = { submitted: 0, verified: 0, rejected: 0 }
      for (const c of pullCounts) if (c.buildId === build.id) pulls[c.status] = c.n
      const last = takedowns.find(t => t.entityId === build.id)
      return {
        id: build.id,
        slug: build.slug,
        title: build.title,
        status: build.status,
        verified: build.verifiedAt !== null,
        publishedAt: build.publishedAt?.toISOString() ?? null,
        shop: { slug: shopSlug, shopName },
        pulls,
        lastUnpublished: last ? { at: last.at.toISOString(), reason: last.note, by: last.by } : null,
      }
    }),
  }
}

/**
 * Takes a published build off the public site: it becomes a draft its shop can put right and
 * publish again. One audit row carries the reason, in the same transaction. Returns what the e-mail needs.
 */
export async function unpublishBuild(db: Database, input: { actorId: number, buildId: number, reason: string }) {
  return inRetriedTransaction(db, async (tx) => {
    const [build] = await tx.select().from(builds).where(eq(builds.id, input.buildId)).for('update')
    if (!build) throw createError({ status: 404, message: 'No build has that id.' })
    if (build.status !== 'published') throw createError({ status: 409, message: `That build is ${build.status}, not published; only a published build can be taken down.` })
    const now = new Date()
    await tx.update(builds).set({ status: 'draft', updatedAt: now }).where(and(eq(builds.id, build.id), eq(builds.status, 'published')))
    await writeAudit(tx, {
      actorId: input.actorId,
      action: 'listing.unpublish',
      entityType: 'build',
      entityId: build.id,
      before: { status: build.status, slug: build.slug },
      after: { status: 'draft', slug: build.slug },
      note: input.reason,
      at: now,
    })
    const [owner] = await tx.select({ email: users.email, name: users.name }).from(shops)
      .innerJoin(users, eq(users.id, shops.userId)).where(eq(shops.id, build.shopId))
    await recordBuildChange(tx, build.id)
    return { buildId: build.id, buildSlug: build.slug, buildTitle: build.title, email: owner!.email, name: owner!.name }
  })
}
