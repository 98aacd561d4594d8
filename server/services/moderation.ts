import { createError } from 'h3'
import { and, count, desc, eq, inArray, like, or, type SQL } from 'drizzle-orm'
import type { AdminListingsQuery } from '../../shared/schemas/admin'
import type { AdminListingRow } from '../../shared/types/admin'
import type { Page } from '../../shared/types/listings'
import { auditLog, builderProfiles, builds, dynoPulls, users } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { writeAudit } from './audit'
import { recordBuildChange } from './search-feed'

const likePattern = (text: string) => `%${text.replace(/[\\%_]/g, c => `\\${c}`)}%`

/** Every listing for the moderation page, newest change first, searchable by title, address or shop. */
export async function listListings(db: Database, query: AdminListingsQuery): Promise<Page<AdminListingRow>> {
  const filters: SQL[] = []
  if (query.status) filters.push(eq(builds.status, query.status))
  if (query.q) {
    const p = likePattern(query.q)
    filters.push(or(like(builds.title, p), like(builds.slug, p), like(builderProfiles.shopName, p))!)
  }
  const where = filters.length ? and(...filters) : undefined
  const [rows, totals] = await Promise.all([
    db.select({ build: builds, shopSlug: builderProfiles.slug, shopName: builderProfiles.shopName }).from(builds)
      .innerJoin(builderProfiles, eq(builderProfiles.id, builds.builderId))
      .where(where)
      .orderBy(desc(builds.updatedAt), desc(builds.id))
      .limit(query.perPage).offset((query.page - 1) * query.perPage),
    db.select({ n: count() }).from(builds).innerJoin(builderProfiles, eq(builderProfiles.id, builds.builderId)).where(where),
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
 * Takes a published listing off the public site: it becomes a draft its shop can put right and
 * publish again. One audit row carries the reason, in the same transaction. Returns what the e-mail needs.
 */
export async function unpublishListing(db: Database, input: { actorId: number, buildId: number, reason: string }) {
  return inRetriedTransaction(db, async (tx) => {
    const [build] = await tx.select().from(builds).where(eq(builds.id, input.buildId)).for('update')
    if (!build) throw createError({ status: 404, message: 'No listing has that id.' })
    if (build.status !== 'published') throw createError({ status: 409, message: `That listing is ${build.status}, not published; only a published listing can be taken down.` })
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
    const [owner] = await tx.select({ email: users.email, name: users.name }).from(builderProfiles)
      .innerJoin(users, eq(users.id, builderProfiles.userId)).where(eq(builderProfiles.id, build.builderId))
    await recordBuildChange(tx, build.id)
    return { buildId: build.id, buildSlug: build.slug, buildTitle: build.title, email: owner!.email, name: owner!.name }
  })
}
