// The demo's finished deals and their reviews: invented orders between demo racers and two shops,
// opened through the deal services and then given a past (dates, milestone outcomes, a delivery pull)
// so each shop has a track record to show, with reviews and one shop answer. Seeded after every other
// demo deal, so the ids the access matrix names stay where they are.
import { createHash } from 'node:crypto'
import { and, asc, eq, gte } from 'drizzle-orm'
import type { MySql2Database } from 'drizzle-orm/mysql2'
import type Stripe from 'stripe'
import * as schema from '../../server/database/schema'
import { type DealContext, loadActor } from '../../server/services/deal-context'
import { acceptQuote, createRequest, sendQuote } from '../../server/services/deals'
import { postMessage } from '../../server/services/messages'
import { quoteRequestSchema, quoteSchema } from '../../shared/schemas/deals'
import type { ReviewAspects } from '../../server/database/schema'

type Db = MySql2Database<typeof schema>
type MilestoneState = schema.MilestoneState

const HOUR = 3_600_000
const DAY = 24 * HOUR
const dayOf = (d: Date) => d.toISOString().slice(0, 10)

export interface PastMilestone {
  /** Days after the request the milestone was due. */
  dueDay: number
  /** Days after the request it was submitted, or null for never. */
  submittedDay: number | null
  state: MilestoneState
  /** Days after the request it was disputed. */
  disputedDay?: number
  /** A guaranteed milestone's verified delivery pull: its peak under the quoted standard and the least that meets the guarantee. */
  pull?: { peakHp: number, minimumHp: number }
}

export interface PastDeal {
  requestId: number
  orderId: number
  shopUserId: number
  /** When the request was sent. */
  at: Date
  /** Hours to the shop's first message, when it wrote one before quoting. */
  replyAfterH?: number
  quoteAfterH: number
  orderStatus: 'active' | 'completed' | 'cancelled'
  /** The order's milestones by position; any beyond these are left cancelled. */
  milestones: PastMilestone[]
}

/**
 * Gives an order opened through the services a past: the request's, message's and quote's times, each
 * milestone's due date, submission and outcome, a verified delivery pull for a guaranteed one, and the
 * order's end. Ends with a deal event, as every state change does.
 */
export async function pastDeal(db: Db, deal: PastDeal): Promise<void> {
  const at = (h: number) => new Date(deal.at.getTime() + h * HOUR)
  const onDay = (d: number) => new Date(deal.at.getTime() + d * DAY)
  await db.update(schema.quoteRequests).set({ createdAt: deal.at, status: 'accepted' }).where(eq(schema.quoteRequests.id, deal.requestId))
  const shopMessages = await db.select({ id: schema.requestMessages.id }).from(schema.requestMessages)
    .where(and(eq(schema.requestMessages.requestId, deal.requestId), eq(schema.requestMessages.senderId, deal.shopUserId), eq(schema.requestMessages.kind, 'message')))
    .orderBy(asc(schema.requestMessages.id))
  for (const m of shopMessages) {
    await db.update(schema.requestMessages).set({ createdAt: at(deal.replyAfterH ?? deal.quoteAfterH) }).where(eq(schema.requestMessages.id, m.id))
  }
  await db.update(schema.quotes).set({ createdAt: at(deal.quoteAfterH) }).where(eq(schema.quotes.requestId, deal.requestId))
  const rows = await db.select().from(schema.milestones).where(eq(schema.milestones.orderId, deal.orderId)).orderBy(asc(schema.milestones.position))
  let last = deal.at
  for (const [i, row] of rows.entries()) {
    const m = deal.milestones[i]
    if (!m) {
      await db.update(schema.milestones).set({ state: 'cancelled', createdAt: at(deal.quoteAfterH + 1) }).where(eq(schema.milestones.id, row.id))
      continue
    }
    const submittedAt = m.submittedDay === null ? null : onDay(m.submittedDay)
    const ended = submittedAt ? new Date(submittedAt.getTime() + 2 * DAY) : null
    if (ended && ended > last) last = ended
    let deliveryPullId: number | null = null
    if (m.pull) {
      const bytes = Buffer.from(`rpm,torque_lbft\n# invented demo delivery pull for milestone ${row.id}\n`)
      const sha = createHash('sha256').update(bytes).digest('hex')
      const [file] = await db.insert(schema.files).values({ ownerId: deal.shopUserId, kind: 'pull', mime: 'text/csv', sizeBytes: bytes.length, sha256: sha, storageKey: `demo/delivery-${row.id}-${sha.slice(0, 12)}.csv`, originalName: 'delivery-pull.csv' }).$returningId()
      const meets = m.pull.peakHp >= m.pull.minimumHp
      const [pull] = await db.insert(schema.deliveryPulls).values({
        milestoneId: row.id, fileId: file!.id, declaredStandard: 'SAE_J1349_2004', boreIn: 4.03, strokeIn: 3.58, cylinders: 8, status: 'verified', meetsTarget: meets,
        report: { standard: 'SAE_J1349_2004', peakHp: m.pull.peakHp, peakHpRpm: 7000, peakTq: Math.round(m.pull.peakHp * 0.82), peakTqRpm: 5400, uncorrected: false, displacementCi: 365.3, targetHp: Math.round(m.pull.minimumHp / 0.98), minimumHp: m.pull.minimumHp, checks: [], reasons: [] },
        createdAt: submittedAt ?? onDay(m.dueDay),
      }).$returningId()
      if (meets) deliveryPullId = pull!.id
    }
    await db.update(schema.milestones).set({
      dueDate: dayOf(onDay(m.dueDay)), submittedAt, state: m.state, guaranteed: m.pull !== undefined, deliveryPullId,
      disputedAt: m.disputedDay === undefined ? null : onDay(m.disputedDay),
      fundedAt: at(deal.quoteAfterH + 2), releasedAt: m.state === 'released' ? ended : null, refundedAt: m.state === 'refunded' ? ended : null,
      createdAt: at(deal.quoteAfterH + 1),
    }).where(eq(schema.milestones.id, row.id))
  }
  await db.update(schema.orders).set({ status: deal.orderStatus, createdAt: at(deal.quoteAfterH + 1), completedAt: deal.orderStatus === 'completed' ? last : null, cancelledAt: deal.orderStatus === 'cancelled' ? last : null })
    .where(eq(schema.orders.id, deal.orderId))
  await db.insert(schema.dealEvents).values({ requestId: deal.requestId, orderId: deal.orderId, action: deal.orderStatus === 'completed' ? 'order_completed' : deal.orderStatus === 'cancelled' ? 'order_cancelled' : 'milestone_submitted', createdAt: last })
}

/** The demo reviews' deals are marked by this title prefix, so a second seed leaves them as they are. */
export const PAST_DEAL_PREFIX = 'Finished:'

const noPayments = new Proxy({}, { get: () => {
  throw new Error('the demo seed makes no payments')
} }) as Stripe

async function actor(db: Db, email: string) {
  const [u] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email)).limit(1)
  const a = u ? await loadActor(db, u.id) : null
  if (!a) throw new Error(`the demo account ${email} is missing`)
  return a
}

const aspects = (a: number, b: number, c: number | null, d: number): ReviewAspects => ({ communication: a, keptToQuote: b, powerVsTarget: c, finishAndPaperwork: d })

/** Seeds finished deals with reviews for two shops (Tallgrass and Kestrel Bay); returns how many deals it made. */
export async function seedDemoReviews(db: Db, platformFeeBps = 500): Promise<number> {
  const [done] = await db.select({ id: schema.quoteRequests.id }).from(schema.quoteRequests).where(eq(schema.quoteRequests.title, `${PAST_DEAL_PREFIX} 347 ci street/strip on pump gas`)).limit(1)
  if (done) return 0
  const started = new Date(Date.now() - 1000)
  const ctx: DealContext = { db, stripe: noPayments, config: { platformFeeBps, autoApproveDays: 7, siteUrl: 'http://127.0.0.1:3000' }, now: () => new Date() }
  const [freya, samir, hollis, tobias] = await Promise.all([
    actor(db, 'freya@racer.test'), actor(db, 'samir@racer.test'), actor(db, 'hollis@tallgrass.test'), actor(db, 'tobias@kestrelbay.test'),
  ])
  const inDays = (n: number) => dayOf(new Date(Date.now() + n * DAY))
  const shopSlug = async (a: typeof hollis) => (await db.select({ slug: schema.shops.slug }).from(schema.shops).where(eq(schema.shops.id, a.shopId!)).limit(1))[0]!.slug
  const firstBuild = async (a: typeof hollis) => (await db.select({ slug: schema.builds.slug }).from(schema.builds).where(and(eq(schema.builds.shopId, a.shopId!), eq(schema.builds.status, 'published'))).limit(1))[0]?.slug

  const deals: { racer: typeof freya, shop: typeof hollis, title: string, past: Omit<PastDeal, 'requestId' | 'orderId' | 'shopUserId'>, review?: { rating: number, aspects: ReviewAspects, body: string, showDeliveryPull?: boolean, answer?: string } }[] = [
    {
      racer: freya, shop: hollis, title: `${PAST_DEAL_PREFIX} 347 ci street/strip on pump gas`,
      past: { at: new Date(Date.now() - 200 * DAY), replyAfterH: 3, quoteAfterH: 30, orderStatus: 'completed', milestones: [
        { dueDay: 20, submittedDay: 18, state: 'released' }, { dueDay: 60, submittedDay: 58, state: 'released' }, { dueDay: 95, submittedDay: 97, state: 'released', pull: { peakHp: 598, minimumHp: 588 } },
      ] },
      review: { rating: 5, aspects: aspects(5, 5, 5, 4), body: 'Hollis answered every question the same day and the invoices matched the quote line by line. The delivery pull beat the guarantee by ten horsepower.', showDeliveryPull: true, answer: 'Thanks Freya. The last milestone slipped two days while we waited on the valve springs; we said so in the thread.' },
    },
    {
      racer: samir, shop: hollis, title: `${PAST_DEAL_PREFIX} methanol bracket short block`,
      past: { at: new Date(Date.now() - 150 * DAY), quoteAfterH: 20, orderStatus: 'completed', milestones: [
        { dueDay: 15, submittedDay: 15, state: 'released' }, { dueDay: 45, submittedDay: 52, state: 'released' }, { dueDay: 80, submittedDay: 79, state: 'released' },
      ] },
      review: { rating: 4, aspects: aspects(4, 5, null, 4), body: 'Good machine work and clean paperwork. The short block came a week after the date in the quote, but I was told early.' },
    },
    {
      racer: freya, shop: tobias, title: `${PAST_DEAL_PREFIX} big block for an offshore boat`,
      past: { at: new Date(Date.now() - 120 * DAY), replyAfterH: 28, quoteAfterH: 70, orderStatus: 'completed', milestones: [
        { dueDay: 20, submittedDay: 24, state: 'released' }, { dueDay: 50, submittedDay: 49, disputedDay: 51, state: 'released' }, { dueDay: 90, submittedDay: 96, state: 'released', pull: { peakHp: 505, minimumHp: 490 } },
      ] },
      review: { rating: 3, aspects: aspects(2, 4, 4, 3), body: 'The engine made its number on the dyno, but replies took a day or more and we needed a dispute to agree what the head work included.' },
    },
    {
      racer: samir, shop: tobias, title: `${PAST_DEAL_PREFIX} jet boat engine, refunded`,
      past: { at: new Date(Date.now() - 90 * DAY), replyAfterH: 6, quoteAfterH: 48, orderStatus: 'completed', milestones: [
        { dueDay: 20, submittedDay: 19, state: 'released' }, { dueDay: 60, submittedDay: null, state: 'refunded', disputedDay: 70, pull: { peakHp: 402, minimumHp: 431 } },
      ] },
    },
  ]
  for (const d of deals) {
    const slug = await shopSlug(d.shop)
    const build = await firstBuild(d.shop)
    const request = await createRequest(ctx, d.racer, quoteRequestSchema.parse({
      shop: slug, build, title: d.title, targetHp: 600, targetTq: 500, targetStandard: 'SAE_J1349_2004', displacementCapCi: null, fuel: 'pump_gas', aspiration: 'na',
      intendedUse: d.shop === tobias ? 'marine' : 'street_strip', transmission: d.shop === tobias ? 'none' : 'manual', stallRpm: null, shiftRpm: 7000, budgetMinCents: 1_500_000, budgetMaxCents: 2_200_000, deadline: null, notes: 'An invented demo deal.',
    }))
    if (d.past.replyAfterH !== undefined) await postMessage(ctx, d.shop, request.id, { body: 'Thanks for the details; a few questions before we quote.', attachmentIds: [] })
    const q = await sendQuote(ctx, d.shop, request.id, quoteSchema.parse({
      lineItems: [{ category: 'Engine', description: 'Machine work, assembly and dyno', quantity: 1, unitPriceCents: 1_800_000 }],
      milestones: [
        { title: 'Parts and machine work', deliverable: 'Parts ordered, block machined', amountCents: 540_000, dueDate: inDays(20) },
        { title: 'Short block', deliverable: 'Assembled short block', amountCents: 720_000, dueDate: inDays(50) },
        { title: 'Dyno delivery', deliverable: 'Finished engine with the delivery pull', amountCents: 540_000, dueDate: inDays(90) },
      ],
      validUntil: inDays(30), notes: 'Invented demo quote.', guarantee: { hp: 600, tolerancePct: 2, standard: 'SAE_J1349_2004' },
    }))
    const { orderId } = await acceptQuote(ctx, d.racer, q.quoteId, q.revision)
    await pastDeal(db, { ...d.past, requestId: request.id, orderId, shopUserId: d.shop.id })
    if (d.review) {
      const [order] = await db.select({ completedAt: schema.orders.completedAt }).from(schema.orders).where(eq(schema.orders.id, orderId)).limit(1)
      const written = new Date(order!.completedAt!.getTime() + 3 * DAY)
      const [reqRow] = await db.select({ buildId: schema.quoteRequests.buildId }).from(schema.quoteRequests).where(eq(schema.quoteRequests.id, request.id)).limit(1)
      await db.insert(schema.reviews).values({
        orderId, shopId: d.shop.shopId!, buildId: reqRow?.buildId ?? null, authorId: d.racer.id, rating: d.review.rating, aspects: d.review.aspects, body: d.review.body,
        showDeliveryPull: d.review.showDeliveryPull ?? false, createdAt: written,
        answer: d.review.answer ?? null, answeredAt: d.review.answer ? new Date(written.getTime() + DAY) : null,
      })
    }
  }
  await db.delete(schema.mailOutbox).where(gte(schema.mailOutbox.createdAt, started))
  return deals.length
}
