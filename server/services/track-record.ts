// A shop's track record, computed from its deals on read. The rows come from a handful of indexed
// queries per set of shopRows and are cached per shop, keyed on the newest deal event, thread message and
// delivery pull ids: every change of a deal's state writes a deal event in its own transaction, so the
// cache is stale the moment that commits, on every app instance alike, and one cheap query of three
// primary-key maxima tells. Storing the figures instead would add a write to every state change.
import { and, asc, eq, inArray, isNotNull, sql } from 'drizzle-orm'
import {
  shops, dealEvents, deliveryPulls, milestones, orders, quoteRequests, quotes, requestMessages,
} from '../database/schema'
import type { Executor } from './deal-context'
import { type RecordFigure, type TrackRecord, median, pct } from '#shared/reviews/track-record'
import type { RecordItem } from '#shared/types/reviews'

interface Counted extends RecordItem { requestId: number, racerId: number, orderId: number | null, title: string }

interface ShopDeals {
  record: TrackRecord
  items: Record<RecordFigure, Counted[]>
}

const HOUR = 3_600_000
const day = (d: Date) => d.toISOString().slice(0, 10)
const month = (d: Date) => d.toISOString().slice(0, 7)
const hours = (ms: number) => Math.round(10 * ms / HOUR) / 10

/** The cache key: the newest deal event, message and delivery pull. */
async function dealsVersion(db: Executor): Promise<string> {
  const [row] = await db.select({
    e: sql<number | null>`(select max(${dealEvents.id}) from ${dealEvents})`,
    m: sql<number | null>`(select max(${requestMessages.id}) from ${requestMessages})`,
    p: sql<number | null>`(select max(${deliveryPulls.id}) from ${deliveryPulls})`,
  }).from(sql`(select 1) as one`)
  return `${row?.e ?? 0}:${row?.m ?? 0}:${row?.p ?? 0}`
}

const cache = new Map<number, { version: string, deals: ShopDeals }>()

/** Computes the records of the given shopRows from their deals, uncached. */
export async function computeShopDeals(db: Executor, shopIds: number[]): Promise<Map<number, ShopDeals>> {
  const out = new Map<number, ShopDeals>()
  if (shopIds.length === 0) return out
  const shopRows = await db.select({ id: shops.id, userId: shops.userId }).from(shops).where(inArray(shops.id, shopIds))
  const requests = await db.select({ id: quoteRequests.id, shopId: quoteRequests.shopId, racerId: quoteRequests.racerId, title: quoteRequests.title, createdAt: quoteRequests.createdAt })
    .from(quoteRequests).where(inArray(quoteRequests.shopId, shopIds)).orderBy(asc(quoteRequests.id))
  const requestIds = requests.map(r => r.id)
  const orderRows = await db.select().from(orders).where(inArray(orders.shopId, shopIds))
  const orderIds = orderRows.map(o => o.id)
  const milestoneRows = orderIds.length === 0
    ? []
    : await db.select({
        id: milestones.id, orderId: milestones.orderId, title: milestones.title, dueDate: milestones.dueDate, submittedAt: milestones.submittedAt, state: milestones.state,
        disputedAt: milestones.disputedAt, guaranteed: milestones.guaranteed, deliveryPullId: milestones.deliveryPullId, createdAt: milestones.createdAt,
      }).from(milestones).where(inArray(milestones.orderId, orderIds)).orderBy(asc(milestones.orderId), asc(milestones.position))
  const guaranteedIds = milestoneRows.filter(m => m.guaranteed).map(m => m.id)
  const pulls = guaranteedIds.length === 0
    ? []
    : await db.select({ id: deliveryPulls.id, milestoneId: deliveryPulls.milestoneId, status: deliveryPulls.status, meetsTarget: deliveryPulls.meetsTarget, report: deliveryPulls.report })
        .from(deliveryPulls).where(inArray(deliveryPulls.milestoneId, guaranteedIds))
  const firstQuotes = requestIds.length === 0
    ? []
    : await db.select({ requestId: quotes.requestId, at: quotes.createdAt }).from(quotes).where(inArray(quotes.requestId, requestIds))
  const firstMessages = requestIds.length === 0
    ? []
    : await db.select({ requestId: requestMessages.requestId, senderId: requestMessages.senderId, at: sql<string>`min(${requestMessages.createdAt})` })
        .from(requestMessages)
        .where(and(inArray(requestMessages.requestId, requestIds), eq(requestMessages.kind, 'message'), isNotNull(requestMessages.senderId)))
        .groupBy(requestMessages.requestId, requestMessages.senderId)

  const shopUser = new Map(shopRows.map(s => [s.id, s.userId]))
  const requestById = new Map(requests.map(r => [r.id, r]))
  const dealNo = new Map<number, number>()
  for (const id of shopIds) {
    requests.filter(r => r.shopId === id).forEach((r, i) => dealNo.set(r.id, i + 1))
  }
  const orderById = new Map(orderRows.map(o => [o.id, o]))
  const quoteAt = new Map(firstQuotes.map(q => [q.requestId, q.at]))
  const asDate = (v: string | Date) => v instanceof Date ? v : new Date(`${v.replace(' ', 'T')}Z`)

  for (const shopId of shopIds) {
    const items: ShopDeals['items'] = { 'orders': [], 'on-time': [], 'guarantees': [], 'disputes': [], 'first-reply': [], 'quote-time': [] }
    const item = (requestId: number, at: Date, outcome: string, orderId: number | null): Counted => {
      const r = requestById.get(requestId)!
      return { deal: dealNo.get(requestId)!, month: month(at), outcome, requestId, racerId: r.racerId, orderId, title: r.title }
    }
    const shopOrders = orderRows.filter(o => o.shopId === shopId)
    const ordersFig = { completed: 0, active: 0, cancelled: 0, total: shopOrders.length }
    for (const o of shopOrders) {
      ordersFig[o.status] += 1
      items.orders.push(item(o.requestId, o.completedAt ?? o.createdAt, o.status === 'completed' ? 'completed' : o.status === 'active' ? 'in progress' : 'cancelled', o.id))
    }
    const shopMilestones = milestoneRows.filter(m => orderById.get(m.orderId)?.shopId === shopId)
    let onTime = 0
    let submitted = 0
    let met = 0
    let missed = 0
    const dispute = { opened: 0, refunded: 0, released: 0, open: 0 }
    const lostOrders = new Set<number>()
    for (const m of shopMilestones) {
      const order = orderById.get(m.orderId)!
      if (m.submittedAt) {
        submitted += 1
        const late = Math.round((Date.parse(`${day(m.submittedAt)}T00:00:00Z`) - Date.parse(`${m.dueDate}T00:00:00Z`)) / 86_400_000)
        if (late <= 0) onTime += 1
        items['on-time'].push(item(order.requestId, m.submittedAt, late <= 0 ? 'on or before the due date' : `${late} ${late === 1 ? 'day' : 'days'} late`, order.id))
      }
      if (m.guaranteed) {
        const mine = pulls.filter(p => p.milestoneId === m.id)
        const delivered = mine.find(p => p.id === m.deliveryPullId && p.status === 'verified' && p.meetsTarget)
        const underTarget = mine.filter(p => p.status === 'verified' && !p.meetsTarget)
        if (delivered) {
          met += 1
          items.guarantees.push(item(order.requestId, m.submittedAt ?? m.createdAt, `met: ${delivered.report.peakHp} hp under ${delivered.report.standard}, needed ${delivered.report.minimumHp ?? delivered.report.targetHp} hp`, order.id))
        }
        else if ((m.state === 'refunded' || m.state === 'cancelled') && underTarget.length > 0) {
          missed += 1
          const best = underTarget.reduce((a, b) => (a.report.peakHp >= b.report.peakHp ? a : b))
          items.guarantees.push(item(order.requestId, m.createdAt, `missed: best verified pull ${best.report.peakHp} hp under ${best.report.standard}, needed ${best.report.minimumHp ?? best.report.targetHp} hp`, order.id))
        }
      }
      if (m.disputedAt) {
        dispute.opened += 1
        const ended = m.state === 'disputed' ? 'open' : m.state === 'approved' || m.state === 'released' ? 'released' : 'refunded'
        dispute[ended] += 1
        if (ended !== 'released') lostOrders.add(order.id)
        items.disputes.push(item(order.requestId, m.disputedAt, ended === 'open' ? 'still open' : ended === 'released' ? 'ended: released to the shop' : 'ended: refunded to the racer', order.id))
      }
    }
    const shopRequests = requests.filter(r => r.shopId === shopId)
    const replyHours: number[] = []
    const quoteHours: number[] = []
    const owner = shopUser.get(shopId)
    for (const r of shopRequests) {
      const order = shopOrders.find(o => o.requestId === r.id)
      const message = firstMessages.filter(m => m.requestId === r.id && m.senderId === owner).map(m => asDate(m.at))[0]
      const quoted = quoteAt.get(r.id)
      const candidates = [message, quoted].filter((d): d is Date => d instanceof Date)
      if (candidates.length > 0) {
        const first = Math.min(...candidates.map(d => d.getTime()))
        const h = Math.max(0, first - r.createdAt.getTime()) / HOUR
        replyHours.push(h)
        items['first-reply'].push(item(r.id, r.createdAt, `first reply after ${hours(h * HOUR)} h`, order?.id ?? null))
      }
      if (quoted) {
        const h = Math.max(0, quoted.getTime() - r.createdAt.getTime()) / HOUR
        quoteHours.push(h)
        items['quote-time'].push(item(r.id, r.createdAt, `quoted after ${hours(h * HOUR)} h`, order?.id ?? null))
      }
    }
    const medianReply = median(replyHours)
    const medianQuote = median(quoteHours)
    out.set(shopId, {
      record: {
        orders: ordersFig,
        onTime: { onTime, submitted, sharePct: pct(onTime, submitted) },
        guarantees: { met, missed, counted: met + missed, sharePct: pct(met, met + missed) },
        disputes: { ...dispute, ordersWithLoss: lostOrders.size },
        firstReply: { medianHours: medianReply === null ? null : hours(medianReply * HOUR), answered: replyHours.length, requests: shopRequests.length },
        quoteTime: { medianHours: medianQuote === null ? null : hours(medianQuote * HOUR), quoted: quoteHours.length, requests: shopRequests.length },
      },
      items,
    })
  }
  return out
}

/** The records of the given shopRows, from the cache while no deal has moved since. */
export async function shopDeals(db: Executor, shopIds: number[]): Promise<Map<number, ShopDeals>> {
  const version = await dealsVersion(db)
  const out = new Map<number, ShopDeals>()
  const missing: number[] = []
  for (const id of shopIds) {
    const hit = cache.get(id)
    if (hit && hit.version === version) out.set(id, hit.deals)
    else missing.push(id)
  }
  if (missing.length > 0) {
    const fresh = await computeShopDeals(db, missing)
    for (const [id, deals] of fresh) {
      cache.set(id, { version, deals })
      out.set(id, deals)
    }
  }
  return out
}

export async function trackRecords(db: Executor, shopIds: number[]): Promise<Map<number, TrackRecord>> {
  const all = await shopDeals(db, shopIds)
  return new Map([...all].map(([id, d]) => [id, d.record]))
}

/** Who is looking at a figure's list: the parties of a deal (and admins) see its title and a link; others see a number. */
export interface RecordViewer { userId: number, role: string, shopId: number | null }

/** The deals behind one figure, anonymised for anyone who is not a party to them. */
export function figureItems(deals: ShopDeals, figure: RecordFigure, shopId: number, viewer: RecordViewer | null): RecordItem[] {
  return deals.items[figure].map((c) => {
    const base: RecordItem = { deal: c.deal, month: c.month, outcome: c.outcome }
    const party = viewer !== null && (viewer.role === 'admin' || viewer.userId === c.racerId || viewer.shopId === shopId)
    if (!party) return base
    return { ...base, title: c.title, link: c.orderId === null ? `/deals/requests/${c.requestId}` : `/deals/orders/${c.orderId}` }
  })
}

/** A shop by slug with its record; null when no shop has the slug. */
export async function shopRecord(db: Executor, slug: string) {
  const [shop] = await db.select({ id: shops.id, slug: shops.slug, shopName: shops.shopName }).from(shops).where(eq(shops.slug, slug)).limit(1)
  if (!shop) return null
  const deals = (await shopDeals(db, [shop.id])).get(shop.id)!
  return { shop, deals }
}
