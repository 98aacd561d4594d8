// The admin's side of disputes: the open ones oldest first with the recently settled ones, and one
// dispute with everything needed to decide it (the order, the milestone with its proof, the
// payments with their Stripe ids, the whole thread). The decision itself is settleDispute in
// milestones.ts, which writes its audit row in the same transaction as the change.
import { and, asc, desc, eq } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type { DisputeList, DisputeListItem, DisputeReview, SettledDisputeItem } from '../../shared/types/admin'
import { auditLog, shops, milestones, orders, quoteRequests, users } from '../database/schema'
import { type DealActor, type DealContext, type Executor, notFound, partiesOf } from './deal-context'
import { threadMessages } from './messages'
import { getOrderView } from './milestones'

/** How many settled disputes the list shows under the open ones. */
export const SETTLED_SHOWN = 20

const SETTLE_ACTION = 'dispute.settle'

function disputeColumns() {
  return {
    milestoneId: milestones.id, orderId: orders.id, requestId: quoteRequests.id, title: quoteRequests.title,
    racerId: users.id, racerName: users.name, shopSlug: shops.slug, shopName: shops.shopName,
    milestoneTitle: milestones.title, position: milestones.position, amountCents: milestones.amountCents,
    disputedAt: milestones.disputedAt, reason: milestones.disputeReason, state: milestones.state,
  }
}

interface DisputeRow {
  milestoneId: number
  orderId: number
  requestId: number
  title: string
  racerId: number
  racerName: string
  shopSlug: string
  shopName: string
  milestoneTitle: string
  position: number
  amountCents: number
  disputedAt: Date | null
  reason: string | null
}

function item(r: DisputeRow): Omit<DisputeListItem, 'disputedAt'> & { disputedAt: string | null } {
  return {
    milestoneId: r.milestoneId, orderId: r.orderId, requestId: r.requestId, title: r.title,
    racer: { id: r.racerId, name: r.racerName }, shop: { slug: r.shopSlug, shopName: r.shopName },
    milestone: { title: r.milestoneTitle, position: r.position, amountCents: r.amountCents },
    disputedAt: r.disputedAt?.toISOString() ?? null, reason: r.reason ?? '',
  }
}

/** Open disputes, oldest first, and the most recently settled ones, newest first. */
export async function listDisputes(db: Executor): Promise<DisputeList> {
  const settledBy = alias(users, 'settled_by')
  const [open, settled] = await Promise.all([
    db.select(disputeColumns()).from(milestones)
      .innerJoin(orders, eq(orders.id, milestones.orderId))
      .innerJoin(quoteRequests, eq(quoteRequests.id, orders.requestId))
      .innerJoin(users, eq(users.id, orders.racerId))
      .innerJoin(shops, eq(shops.id, orders.shopId))
      .where(eq(milestones.state, 'disputed'))
      .orderBy(asc(milestones.disputedAt), asc(milestones.id)),
    db.select({ ...disputeColumns(), before: auditLog.before, after: auditLog.after, note: auditLog.note, settledAt: auditLog.createdAt, settledBy: settledBy.name }).from(auditLog)
      .innerJoin(milestones, eq(milestones.id, auditLog.entityId))
      .innerJoin(orders, eq(orders.id, milestones.orderId))
      .innerJoin(quoteRequests, eq(quoteRequests.id, orders.requestId))
      .innerJoin(users, eq(users.id, orders.racerId))
      .innerJoin(shops, eq(shops.id, orders.shopId))
      .leftJoin(settledBy, eq(settledBy.id, auditLog.actorId))
      .where(and(eq(auditLog.action, SETTLE_ACTION), eq(auditLog.entityType, 'milestone')))
      .orderBy(desc(auditLog.createdAt), desc(auditLog.id))
      .limit(SETTLED_SHOWN),
  ])
  return {
    open: open.map(r => ({ ...item(r), disputedAt: (r.disputedAt ?? new Date(0)).toISOString() })),
    settled: settled.map((r): SettledDisputeItem => ({
      ...item(r),
      // The reason as it stood when the decision was made (kept in the audit row's before).
      reason: String(r.before?.disputeReason ?? r.reason ?? ''),
      settledAt: r.settledAt.toISOString(),
      outcome: r.after?.outcome === 'release' ? 'release' : 'refund',
      note: r.note,
      settledBy: r.settledBy ?? null,
      state: r.state,
    })),
  }
}

/** One dispute by its milestone's id: 404 for a milestone that was never disputed. */
export async function disputeReview(ctx: DealContext, admin: DealActor, milestoneId: number): Promise<DisputeReview> {
  const [m] = await ctx.db.select({ milestone: milestones, requestId: orders.requestId }).from(milestones)
    .innerJoin(orders, eq(orders.id, milestones.orderId)).where(eq(milestones.id, milestoneId)).limit(1)
  if (!m) throw notFound('That dispute')
  const settledBy = alias(users, 'settled_by')
  const [decision] = await ctx.db.select({ audit: auditLog, by: settledBy.name }).from(auditLog)
    .leftJoin(settledBy, eq(settledBy.id, auditLog.actorId))
    .where(and(eq(auditLog.action, SETTLE_ACTION), eq(auditLog.entityType, 'milestone'), eq(auditLog.entityId, milestoneId)))
    .orderBy(desc(auditLog.id)).limit(1)
  if (!m.milestone.disputedAt && !decision) throw notFound('That dispute')
  const [order, thread, parties] = await Promise.all([
    getOrderView(ctx, admin, m.milestone.orderId),
    threadMessages(ctx.db, admin, m.requestId),
    partiesOf(ctx.db, m.requestId),
  ])
  return {
    milestoneId,
    state: m.milestone.state,
    reason: m.milestone.disputeReason ?? (decision?.audit.before?.disputeReason as string | undefined) ?? null,
    disputedAt: m.milestone.disputedAt?.toISOString() ?? null,
    order,
    parties: {
      racer: { name: parties.racerName, email: parties.racerEmail },
      shop: { shopName: parties.shopName, slug: await shopSlug(ctx.db, parties.shopId), ownerName: parties.ownerName, ownerEmail: parties.shopEmail },
    },
    thread,
    history: order.events.filter(e => e.milestoneId === milestoneId),
    settlement: decision
      ? {
          outcome: decision.audit.after?.outcome === 'release' ? 'release' : 'refund',
          note: decision.audit.note,
          at: decision.audit.createdAt.toISOString(),
          by: decision.by ?? null,
          after: decision.audit.after,
        }
      : null,
  }
}

async function shopSlug(db: Executor, shopId: number): Promise<string> {
  const [row] = await db.select({ slug: shops.slug }).from(shops).where(eq(shops.id, shopId)).limit(1)
  return row?.slug ?? ''
}
