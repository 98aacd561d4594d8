// Change orders: after a refunded milestone the shop proposes a new plan for the rest of an active
// order; the racer accepts it (the milestones still awaiting payment are cancelled and the new ones
// added after the existing ones) or declines it (nothing changes). Paid, held and released
// milestones are never touched. Every write locks the order row first (order → milestone → request).
import { and, asc, desc, eq } from 'drizzle-orm'
import { MoneyError, apportion, feeCents, formatCents, lineTotalCents, sumCents } from '../../shared/money'
import { QUOTE_LIMIT_MESSAGE, type ChangeOrderInput } from '../../shared/schemas/deals'
import type { ChangeOrderView } from '../../shared/types/deals'
import { changeOrders, milestones, orders, payments, quoteRevisions, type ChangeOrder, type Milestone, type Order } from '../database/schema'
import { inRetriedTransaction } from '../utils/transaction'
import {
  type DealActor, type DealContext, type DbTransaction, type Executor, conflict, forbidden, isoDay, notFound, partiesOf, recordDealEvent,
  unprocessable,
} from './deal-context'
import { postEvent } from './deals'
import { enqueueMail } from './outbox'
import { assertParty } from './payments'

const link = (ctx: DealContext, orderId: number) => `${ctx.config.siteUrl}/deals/orders/${orderId}`

/** The money of a change order must add up: the milestones to the stated total, and the line items too when there are any. */
export function checkChangeOrderMoney(input: ChangeOrderInput): void {
  try {
    const planned = sumCents(input.milestones.map(m => m.amountCents))
    if (planned !== input.totalCents) {
      throw unprocessable(`The milestones add up to ${formatCents(planned)} but the rest of the order is ${formatCents(input.totalCents)}: they must be equal, to the cent.`)
    }
    if (input.lineItems.length > 0) {
      const lines = sumCents(input.lineItems.map(l => lineTotalCents(l.unitPriceCents, l.quantity)))
      if (lines !== input.totalCents) {
        throw unprocessable(`The line items total ${formatCents(lines)} but the rest of the order is ${formatCents(input.totalCents)}: they must be equal, to the cent.`)
      }
    }
  }
  catch (error) {
    if (error instanceof MoneyError) throw unprocessable(`${QUOTE_LIMIT_MESSAGE} (${error.message}).`)
    throw error
  }
}

/** The order row locked for update, with the caller's side; 404 for a stranger. */
async function lockOrder(tx: DbTransaction, actor: DealActor, orderId: number): Promise<{ order: Order, side: 'racer' | 'builder' | 'admin' }> {
  const [order] = await tx.select().from(orders).where(eq(orders.id, orderId)).limit(1).for('update')
  if (!order) throw notFound('That order')
  const side = assertParty(actor, order)
  return { order, side }
}

const unpaid = (list: Milestone[]) => list.filter(m => m.state === 'awaiting_payment')

/** Why no change order can be sent on this order now, or null when one can. */
function refusal(order: Order, list: Milestone[], open: boolean): string | null {
  if (order.status !== 'active') return `This order is ${order.status}; a change order is for an active order.`
  if (!list.some(m => m.state === 'refunded')) return 'A change order can be sent only after a milestone was refunded.'
  if (open) return 'A change order is already waiting for the racer\'s answer.'
  return null
}

/** The shop sends a change order for the rest of an order that has a refunded milestone. */
export async function sendChangeOrder(ctx: DealContext, actor: DealActor, orderId: number, input: ChangeOrderInput): Promise<{ id: number }> {
  const now = ctx.now()
  const early = input.milestones.find(m => m.dueDate < isoDay(now))
  if (early) throw unprocessable(`The milestone "${early.title}" is due before today.`)
  checkChangeOrderMoney(input)
  return inRetriedTransaction(ctx.db, async (tx) => {
    const { order, side } = await lockOrder(tx, actor, orderId)
    if (side !== 'builder') throw forbidden('Only the shop of the order sends a change order.')
    const list = await tx.select().from(milestones).where(eq(milestones.orderId, orderId)).orderBy(asc(milestones.position))
    const [open] = await tx.select({ id: changeOrders.id }).from(changeOrders).where(and(eq(changeOrders.orderId, orderId), eq(changeOrders.status, 'open'))).limit(1)
    const why = refusal(order, list, Boolean(open))
    if (why) throw conflict(why)
    const [row] = await tx.insert(changeOrders).values({
      orderId, totalCents: input.totalCents, milestones: input.milestones, lineItems: input.lineItems, notes: input.notes, createdBy: actor.id, createdAt: now,
    }).$returningId()
    const id = row!.id
    const parties = await partiesOf(tx, order.requestId)
    const replaced = sumCents(unpaid(list).map(m => m.amountCents))
    await recordDealEvent(tx, { requestId: order.requestId, orderId, actorId: actor.id, action: 'change_order_sent', detail: `${formatCents(input.totalCents)} in place of ${formatCents(replaced)} unpaid` })
    await postEvent(tx, order.requestId, actor.id, `${parties.shopName} sent a change order for the rest of the order: ${formatCents(input.totalCents)} in ${input.milestones.length} milestone${input.milestones.length === 1 ? '' : 's'}, in place of ${formatCents(replaced)} still unpaid.`, now)
    await enqueueMail(tx, parties.racerEmail, {
      kind: 'change_order_sent', racerName: parties.racerName, shopName: parties.shopName, title: parties.title, totalCents: input.totalCents,
      milestones: input.milestones.length, link: link(ctx, orderId),
    }, `change-order:${id}`)
    return { id }
  })
}

/** The racer's change order locked for an answer: the order first, then the change order; 409 unless it is open. */
async function lockForAnswer(tx: DbTransaction, actor: DealActor, orderId: number, changeId: number) {
  const { order, side } = await lockOrder(tx, actor, orderId)
  const [change] = await tx.select().from(changeOrders).where(and(eq(changeOrders.id, changeId), eq(changeOrders.orderId, orderId))).limit(1).for('update')
  if (!change) throw notFound('That change order')
  if (side !== 'racer') throw forbidden('Only the racer of the order answers a change order.')
  if (change.status !== 'open') throw conflict(`This change order was already ${change.status}.`)
  if (order.status !== 'active') throw conflict(`This order is ${order.status}; the change order can no longer be accepted.`)
  return { order, change }
}

/**
 * The racer accepts: the milestones still awaiting payment are cancelled (their open payment pages
 * expired; a payment completed meanwhile is refunded when its event finds the milestone cancelled)
 * and the change order's milestones are added after every existing one, the platform fee shared
 * among them to the cent. The order's total and fee move by the difference.
 */
export async function acceptChangeOrder(ctx: DealContext, actor: DealActor, orderId: number, changeId: number): Promise<{ totalCents: number }> {
  const now = ctx.now()
  return inRetriedTransaction(ctx.db, async (tx) => {
    const { order, change } = await lockForAnswer(tx, actor, orderId, changeId)
    const list = await tx.select().from(milestones).where(eq(milestones.orderId, orderId)).orderBy(asc(milestones.position)).for('update')
    const replaced = unpaid(list)
    for (const m of replaced) {
      const open = await tx.select().from(payments).where(and(eq(payments.milestoneId, m.id), eq(payments.kind, 'checkout'), eq(payments.status, 'open')))
      for (const p of open) {
        const expired = await ctx.stripe.checkout.sessions.expire(p.stripeCheckoutSessionId!, {}, { idempotencyKey: `${p.stripeCheckoutSessionId}-expire` }).then(() => true, () => false)
        if (expired) await tx.update(payments).set({ status: 'expired' }).where(eq(payments.id, p.id))
      }
      await tx.update(milestones).set({ state: 'cancelled' }).where(eq(milestones.id, m.id))
    }
    const [rev] = await tx.select({ bps: quoteRevisions.platformFeeBp }).from(quoteRevisions).where(eq(quoteRevisions.id, order.revisionId)).limit(1)
    const fee = feeCents(change.totalCents, rev?.bps ?? ctx.config.platformFeeBps)
    const fees = apportion(fee, change.milestones.map(m => m.amountCents))
    const next = list.reduce((max, m) => Math.max(max, m.position), -1) + 1
    const guaranteed = replaced.some(m => m.guaranteed)
    await tx.insert(milestones).values(change.milestones.map((m, i) => ({
      orderId, position: next + i, title: m.title, deliverable: m.deliverable, amountCents: m.amountCents, feeCents: fees[i]!, dueDate: m.dueDate,
      guaranteed: guaranteed && i === change.milestones.length - 1, createdAt: now,
    })))
    const replacedCents = sumCents(replaced.map(m => m.amountCents))
    const totalCents = order.totalCents - replacedCents + change.totalCents
    const platformFeeCents = order.platformFeeCents - sumCents(replaced.map(m => m.feeCents)) + fee
    await tx.update(orders).set({ totalCents, platformFeeCents }).where(eq(orders.id, orderId))
    await tx.update(changeOrders).set({ status: 'accepted', answeredAt: now }).where(eq(changeOrders.id, changeId))
    await answered(ctx, tx, actor, order, change, true, `accepted the change order: ${formatCents(change.totalCents)} in place of ${formatCents(replacedCents)} unpaid; the order is now ${formatCents(totalCents)}.`)
    return { totalCents }
  })
}

/** The racer declines: the change order is closed and the order stays exactly as it was. */
export async function declineChangeOrder(ctx: DealContext, actor: DealActor, orderId: number, changeId: number, reason: string): Promise<void> {
  const now = ctx.now()
  await inRetriedTransaction(ctx.db, async (tx) => {
    const { order, change } = await lockForAnswer(tx, actor, orderId, changeId)
    await tx.update(changeOrders).set({ status: 'declined', declineReason: reason, answeredAt: now }).where(eq(changeOrders.id, changeId))
    await answered(ctx, tx, actor, order, change, false, `declined the change order${reason ? `: ${reason}` : '.'}`)
  })
}

/** The deal event, the thread's note and the shop's e-mail for an answered change order, in the answer's transaction. */
async function answered(ctx: DealContext, tx: DbTransaction, actor: DealActor, order: Order, change: ChangeOrder, accepted: boolean, note: string) {
  await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, actorId: actor.id, action: accepted ? 'change_order_accepted' : 'change_order_declined', detail: formatCents(change.totalCents) })
  await postEvent(tx, order.requestId, actor.id, `${actor.name} ${note}`, ctx.now())
  const parties = await partiesOf(tx, order.requestId)
  await enqueueMail(tx, parties.shopEmail, {
    kind: 'change_order_answered', shopName: parties.shopName, racerName: parties.racerName, title: parties.title, totalCents: change.totalCents,
    accepted, link: link(ctx, order.id),
  }, `change-order:${change.id}:${accepted ? 'accepted' : 'declined'}`)
}

/** The order page's part: the latest change order and whether the shop may send one now. */
export async function changeOrderOf(db: Executor, order: Order, list: Pick<Milestone, 'state' | 'amountCents'>[]): Promise<{ changeOrder: ChangeOrderView | null, changeOrderAllowed: boolean }> {
  const [latest] = await db.select().from(changeOrders).where(eq(changeOrders.orderId, order.id)).orderBy(desc(changeOrders.id)).limit(1)
  const open = latest?.status === 'open'
  const allowed = refusal(order, list as Milestone[], open) === null
  if (!latest) return { changeOrder: null, changeOrderAllowed: allowed }
  return {
    changeOrderAllowed: allowed,
    changeOrder: {
      id: latest.id,
      status: latest.status,
      totalCents: latest.totalCents,
      replacedCents: open ? list.filter(m => m.state === 'awaiting_payment').reduce((a, m) => a + m.amountCents, 0) : null,
      milestones: latest.milestones.map((m, position) => ({ position, ...m })),
      lineItems: latest.lineItems.map((l, position) => ({ position, ...l, lineTotalCents: l.unitPriceCents * l.quantity })),
      notes: latest.notes,
      declineReason: latest.declineReason,
      createdAt: latest.createdAt.toISOString(),
      answeredAt: latest.answeredAt?.toISOString() ?? null,
    },
  }
}
