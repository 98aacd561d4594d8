import { asc, count, eq, sql } from 'drizzle-orm'
import type { AdminOverview } from '../../shared/types/admin'
import { builds, dynoPulls } from '../database/schema'
import type { Database } from '../database/types'

/**
 * The admin dashboard's figures, each counted from the rows themselves. Disputes and payments are
 * kept by the deals work; until their tables exist the dashboard says so rather than showing a number.
 */
export async function adminOverview(db: Database, now = new Date()): Promise<AdminOverview> {
  const [[queue], [oldest], [share]] = await Promise.all([
    db.select({ n: count() }).from(dynoPulls).where(eq(dynoPulls.status, 'submitted')),
    db.select({ at: dynoPulls.createdAt }).from(dynoPulls).where(eq(dynoPulls.status, 'submitted')).orderBy(asc(dynoPulls.createdAt)).limit(1),
    db.select({
      published: count(),
      verified: sql<number>`coalesce(sum(${builds.verifiedAt} is not null), 0)`.mapWith(Number),
    }).from(builds).where(eq(builds.status, 'published')),
  ])
  const published = share?.published ?? 0
  const verified = share?.verified ?? 0
  return {
    queue: {
      length: queue?.n ?? 0,
      oldestSubmittedAt: oldest?.at.toISOString() ?? null,
      oldestAgeHours: oldest ? Math.max(0, (now.getTime() - oldest.at.getTime()) / 3_600_000) : null,
    },
    builds: { published, verified, verifiedShare: published ? verified / published : null },
    disputes: { available: false },
    payments: { available: false },
  }
}
