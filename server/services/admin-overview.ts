import { and, asc, count, eq, gte, lt, sql } from 'drizzle-orm'
import type { AdminOverview } from '../../shared/types/admin'
import { builds, dynoPulls, milestones, payments } from '../database/schema'
import type { Database } from '../database/types'

/** The first instant of the calendar month (UTC) that holds `now`, and of the next one. */
export function monthBounds(now: Date): { month: string, from: Date, to: Date } {
  const from = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), 1))
  const to = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() + 1, 1))
  return { month: from.toISOString().slice(0, 7), from, to }
}

const hoursSince = (at: Date, now: Date) => Math.max(0, (now.getTime() - at.getTime()) / 3_600_000)
const sumCents = sql<number>`coalesce(sum(${payments.amountCents}), 0)`.mapWith(Number)

/**
 * The admin dashboard's figures, each counted from the rows themselves: the evidence queue, the
 * share of published builds verified, the open disputes, and this calendar month's money (UTC).
 * A deposit counts in the month it was captured: a checkout row turns `succeeded` once, from the
 * payment service's confirmation, and is not written again, so its `updated_at` is that moment.
 * Refund rows are written when the refund is made, so their `created_at` is the refund's moment.
 */
export async function adminOverview(db: Database, now = new Date()): Promise<AdminOverview> {
  const { month, from, to } = monthBounds(now)
  const [[queue], [oldest], [share], [disputes], [oldestDispute], [captured], [refunded]] = await Promise.all([
    db.select({ n: count() }).from(dynoPulls).where(eq(dynoPulls.status, 'submitted')),
    db.select({ at: dynoPulls.createdAt }).from(dynoPulls).where(eq(dynoPulls.status, 'submitted')).orderBy(asc(dynoPulls.createdAt)).limit(1),
    db.select({
      published: count(),
      verified: sql<number>`coalesce(sum(${builds.verifiedAt} is not null), 0)`.mapWith(Number),
    }).from(builds).where(eq(builds.status, 'published')),
    db.select({ n: count() }).from(milestones).where(eq(milestones.state, 'disputed')),
    db.select({ at: milestones.disputedAt }).from(milestones).where(eq(milestones.state, 'disputed')).orderBy(asc(milestones.disputedAt)).limit(1),
    db.select({ n: count(), cents: sumCents }).from(payments)
      .where(and(eq(payments.kind, 'checkout'), eq(payments.status, 'succeeded'), gte(payments.updatedAt, from), lt(payments.updatedAt, to))),
    db.select({ n: count(), cents: sumCents }).from(payments)
      .where(and(eq(payments.kind, 'refund'), eq(payments.status, 'succeeded'), gte(payments.createdAt, from), lt(payments.createdAt, to))),
  ])
  const published = share?.published ?? 0
  const verified = share?.verified ?? 0
  const disputedAt = oldestDispute?.at ?? null
  return {
    queue: {
      length: queue?.n ?? 0,
      oldestSubmittedAt: oldest?.at.toISOString() ?? null,
      oldestAgeHours: oldest ? hoursSince(oldest.at, now) : null,
    },
    builds: { published, verified, verifiedShare: published ? verified / published : null },
    disputes: {
      open: disputes?.n ?? 0,
      oldestOpenedAt: disputedAt?.toISOString() ?? null,
      oldestAgeHours: disputedAt ? hoursSince(disputedAt, now) : null,
    },
    payments: {
      month,
      count: captured?.n ?? 0,
      amountCents: captured?.cents ?? 0,
      refunds: { count: refunded?.n ?? 0, amountCents: refunded?.cents ?? 0 },
    },
  }
}
