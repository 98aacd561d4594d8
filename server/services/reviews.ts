// Reviews of a shop after a completed order: written once by the order's racer, edited within the
// window (each edit keeps the version it replaces), answered once by the shop, hidden by an admin
// with a reason (one audit row). Shown on the shop's page and on the build the request came from.
import { and, asc, desc, eq, inArray, isNull } from 'drizzle-orm'
import {
  shops, builds, deliveryPulls, milestones, orders, quoteRequests, reviewEdits, reviews, users,
  type DeliveryReport, type Review,
} from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { writeAudit } from './audit'
import { type DealActor, type Executor, conflict, forbidden, isDuplicateKey, notFound, partiesOf, recordDealEvent } from './deal-context'
import { enqueueMail } from './outbox'
import { canEditReview, summariseRatings } from '#shared/reviews/aspects'
import type { ReviewInput } from '#shared/schemas/reviews'
import type { AdminReviewRow, OrderReview, ReviewList, ReviewView } from '#shared/types/reviews'

export type { ReviewList, ReviewView }

const iso = (d: Date | null) => d === null ? null : d.toISOString()
const firstName = (name: string) => name.trim().split(/\s+/)[0] ?? ''

/** The delivery pull of the order's guaranteed milestone (the one it was submitted with), if any. */
async function orderDeliveryPull(db: Executor, orderId: number): Promise<DeliveryReport | null> {
  const [row] = await db.select({ report: deliveryPulls.report }).from(milestones)
    .innerJoin(deliveryPulls, eq(deliveryPulls.id, milestones.deliveryPullId))
    .where(and(eq(milestones.orderId, orderId), eq(milestones.guaranteed, true)))
    .orderBy(desc(milestones.position)).limit(1)
  return row?.report ?? null
}

async function toViews(db: Executor, rows: Review[]): Promise<ReviewView[]> {
  if (rows.length === 0) return []
  const ids = rows.map(r => r.id)
  const authors = await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, [...new Set(rows.map(r => r.authorId))]))
  const buildIds = [...new Set(rows.map(r => r.buildId).filter((x): x is number => x !== null))]
  const buildRows = buildIds.length === 0 ? [] : await db.select({ id: builds.id, slug: builds.slug, title: builds.title, status: builds.status }).from(builds).where(inArray(builds.id, buildIds))
  const edits = await db.select().from(reviewEdits).where(inArray(reviewEdits.reviewId, ids)).orderBy(asc(reviewEdits.id))
  const views: ReviewView[] = []
  for (const r of rows) {
    const build = buildRows.find(b => b.id === r.buildId && b.status === 'published')
    const pull = r.showDeliveryPull ? await orderDeliveryPull(db, r.orderId) : null
    views.push({
      id: r.id,
      rating: r.rating,
      aspects: r.aspects,
      body: r.body,
      author: firstName(authors.find(a => a.id === r.authorId)?.name ?? ''),
      createdAt: r.createdAt.toISOString(),
      editedAt: iso(r.editedAt),
      edits: edits.filter(e => e.reviewId === r.id).map(e => ({ rating: e.rating, body: e.body, writtenAt: e.writtenAt.toISOString() })),
      answer: r.answer === null || r.answeredAt === null ? null : { body: r.answer, at: r.answeredAt.toISOString() },
      build: build ? { slug: build.slug, title: build.title } : null,
      deliveryPull: pull ? { peakHp: pull.peakHp, standard: pull.standard, targetHp: pull.targetHp, minimumHp: pull.minimumHp } : null,
    })
  }
  return views
}

async function listWhere(db: Executor, column: typeof reviews.shopId | typeof reviews.buildId, id: number): Promise<ReviewList> {
  const rows = await db.select().from(reviews).where(eq(column, id)).orderBy(desc(reviews.createdAt), desc(reviews.id))
  const visible = rows.filter(r => r.hiddenAt === null)
  return { summary: summariseRatings(visible), reviews: await toViews(db, visible), hiddenCount: rows.length - visible.length }
}

/** The visible reviews of a shop with their summary; null when no shop has the slug. */
export async function shopReviews(db: Executor, slug: string): Promise<ReviewList | null> {
  const [shop] = await db.select({ id: shops.id }).from(shops).where(eq(shops.slug, slug)).limit(1)
  return shop ? listWhere(db, reviews.shopId, shop.id) : null
}

/** The visible reviews of orders whose request came from this published build; null when there is no such build. */
export async function buildReviews(db: Executor, slug: string): Promise<ReviewList | null> {
  const [build] = await db.select({ id: builds.id }).from(builds).where(and(eq(builds.slug, slug), eq(builds.status, 'published'))).limit(1)
  return build ? listWhere(db, reviews.buildId, build.id) : null
}

/** An order's review for its parties: the review (hidden ones with their reason) and whether the racer may write one now. */
export async function orderReview(db: Executor, actor: DealActor, orderId: number): Promise<OrderReview> {
  const [order] = await db.select({ status: orders.status, racerId: orders.racerId }).from(orders).where(eq(orders.id, orderId)).limit(1)
  if (!order) throw notFound('That order')
  const [row] = await db.select().from(reviews).where(eq(reviews.orderId, orderId)).limit(1)
  const [view] = row ? await toViews(db, [row]) : []
  return {
    review: view ? { ...view, showDeliveryPull: row!.showDeliveryPull, hidden: row!.hiddenAt !== null, hiddenReason: row!.hiddenReason, canEdit: row!.authorId === actor.id && row!.hiddenAt === null && canEditReview(row!.createdAt, new Date()) } : null,
    canReview: !row && order.status === 'completed' && order.racerId === actor.id,
    canAnswer: !!row && row.answer === null && row.hiddenAt === null && actor.shopId === row.shopId,
  }
}

/** Where a review's notice links to and when it is written: the app's public address and the clock. */
export interface ReviewWrite {
  siteUrl: string
  now?: Date
}

/**
 * Tells the shop about a review written or edited: an event on the deal (the shop's notifications and
 * the order's history) and an e-mail through the outbox, unless the shop switched review mail off. Runs
 * inside the review's transaction, so a rolled-back or retried write leaves one notice, never two;
 * the dedupe key (one per review, one per kept edit) is the last word.
 */
async function noticeToShop(tx: Executor, w: { requestId: number, orderId: number, actor: DealActor, rating: number, body: string, edited: boolean, dedupeKey: string, siteUrl: string }) {
  await recordDealEvent(tx, { requestId: w.requestId, orderId: w.orderId, actorId: w.actor.id, action: w.edited ? 'review_edited' : 'review_posted', detail: `${w.rating} of 5` })
  const parties = await partiesOf(tx, w.requestId)
  await enqueueMail(tx, parties.shopEmail, {
    kind: 'review_written', shopName: parties.shopName, racerName: parties.racerName, title: parties.title, rating: w.rating, edited: w.edited,
    excerpt: w.body.length > 280 ? `${w.body.slice(0, 277)}…` : w.body,
    link: `${w.siteUrl}/deals/orders/${w.orderId}#order-review-title`,
  }, w.dedupeKey)
}

/**
 * The racer reviews a completed order, once. The order row is locked first so two tries cannot both
 * pass the check; the unique key on the order is the last word.
 */
export async function createReview(db: Database, actor: DealActor, orderId: number, input: ReviewInput, { siteUrl, now = new Date() }: ReviewWrite): Promise<{ id: number }> {
  try {
    return await inRetriedTransaction(db, async (tx) => {
      const [order] = await tx.select().from(orders).where(eq(orders.id, orderId)).limit(1).for('update')
      if (!order) throw notFound('That order')
      if (order.racerId !== actor.id) throw forbidden('Only the racer of the order reviews the shop.')
      if (order.status !== 'completed') throw conflict('A shop is reviewed once the order\'s last milestone is paid out or settled; this order is not complete yet.')
      const [existing] = await tx.select({ id: reviews.id }).from(reviews).where(eq(reviews.orderId, orderId)).limit(1)
      if (existing) throw conflict('This order has been reviewed already; edit that review instead.')
      const [request] = await tx.select({ buildId: quoteRequests.buildId }).from(quoteRequests).where(eq(quoteRequests.id, order.requestId)).limit(1)
      const [{ id }] = await tx.insert(reviews).values({
        orderId, shopId: order.shopId, buildId: request?.buildId ?? null, authorId: actor.id,
        rating: input.rating, aspects: input.aspects, body: input.body, showDeliveryPull: input.showDeliveryPull, createdAt: now,
      }).$returningId() as [{ id: number }]
      await noticeToShop(tx, { requestId: order.requestId, orderId, actor, rating: input.rating, body: input.body, edited: false, dedupeKey: `review:${id}`, siteUrl })
      return { id }
    })
  }
  catch (e) {
    if (isDuplicateKey(e)) throw conflict('This order has been reviewed already; edit that review instead.')
    throw e
  }
}

/** The author edits their review within the window; the version it replaces is kept. */
export async function editReview(db: Database, actor: DealActor, reviewId: number, input: ReviewInput, { siteUrl, now = new Date() }: ReviewWrite): Promise<void> {
  await inRetriedTransaction(db, async (tx) => {
    const [row] = await tx.select().from(reviews).where(eq(reviews.id, reviewId)).limit(1).for('update')
    if (!row) throw notFound('That review')
    if (row.authorId !== actor.id) throw forbidden('Only the review\'s author edits it.')
    if (row.hiddenAt !== null) throw conflict('This review was hidden by Torquewright and can no longer be edited.')
    if (!canEditReview(row.createdAt, now)) throw conflict('A review can be edited for 14 days after it was written; this one is older.')
    const [kept] = await tx.insert(reviewEdits).values({
      reviewId, rating: row.rating, aspects: row.aspects, body: row.body, showDeliveryPull: row.showDeliveryPull, writtenAt: row.editedAt ?? row.createdAt, createdAt: now,
    }).$returningId() as [{ id: number }]
    await tx.update(reviews).set({ rating: input.rating, aspects: input.aspects, body: input.body, showDeliveryPull: input.showDeliveryPull, editedAt: now }).where(eq(reviews.id, reviewId))
    const [order] = await tx.select({ requestId: orders.requestId }).from(orders).where(eq(orders.id, row.orderId)).limit(1)
    if (order) await noticeToShop(tx, { requestId: order.requestId, orderId: row.orderId, actor, rating: input.rating, body: input.body, edited: true, dedupeKey: `review:${reviewId}:edit:${kept.id}`, siteUrl })
  })
}

/** The reviewed shop answers once, publicly. */
export async function answerReview(db: Database, actor: DealActor, reviewId: number, body: string, now = new Date()): Promise<void> {
  await inRetriedTransaction(db, async (tx) => {
    const [row] = await tx.select().from(reviews).where(eq(reviews.id, reviewId)).limit(1).for('update')
    if (!row) throw notFound('That review')
    if (actor.shopId === null || actor.shopId !== row.shopId) throw forbidden('Only the reviewed shop answers a review.')
    if (row.hiddenAt !== null) throw conflict('This review was hidden by Torquewright; it takes no answer.')
    if (row.answer !== null) throw conflict('The shop has answered this review already; a review takes one answer.')
    const [res] = await tx.update(reviews).set({ answer: body, answeredAt: now }).where(and(eq(reviews.id, reviewId), isNull(reviews.answer)))
    if (res.affectedRows !== 1) throw conflict('The shop has answered this review already; a review takes one answer.')
  })
}

/** An admin hides a review with a reason: one audit row in the same transaction. */
export async function hideReview(db: Database, adminId: number, reviewId: number, reason: string, now = new Date()): Promise<void> {
  await inRetriedTransaction(db, async (tx) => {
    const [row] = await tx.select().from(reviews).where(eq(reviews.id, reviewId)).limit(1).for('update')
    if (!row) throw notFound('That review')
    if (row.hiddenAt !== null) throw conflict('This review is hidden already.')
    await tx.update(reviews).set({ hiddenAt: now, hiddenReason: reason, hiddenBy: adminId }).where(eq(reviews.id, reviewId))
    await writeAudit(tx, {
      actorId: adminId, action: 'review.hide', entityType: 'review', entityId: reviewId,
      before: { hidden: false, rating: row.rating, body: row.body.slice(0, 500) }, after: { hidden: true }, note: reason, at: now,
    })
  })
}

/** Every review, newest first, for the admin's moderation page (with the shop and whether it is hidden). */
export async function adminReviews(db: Executor, limit = 100): Promise<AdminReviewRow[]> {
  const rows = await db.select({ review: reviews, shopName: shops.shopName, shopSlug: shops.slug }).from(reviews)
    .innerJoin(shops, eq(shops.id, reviews.shopId))
    .orderBy(desc(reviews.createdAt), desc(reviews.id)).limit(limit)
  return rows.map(r => ({
    id: r.review.id, orderId: r.review.orderId, shop: { name: r.shopName, slug: r.shopSlug }, rating: r.review.rating, body: r.review.body,
    createdAt: r.review.createdAt.toISOString(), hidden: r.review.hiddenAt !== null, hiddenReason: r.review.hiddenReason,
  }))
}
