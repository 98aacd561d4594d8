// Change orders over HTTP against the real test database and the payments fake: only after a
// refunded milestone, sent by the shop only, answered by the racer only; accepting replaces only the
// milestones still awaiting payment (what was paid, refunded or released stays as it was) with the
// money adding up, declining changes nothing, and one change order is open at a time.
import { and, asc, count, eq, like } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { approveMilestone, disputeMilestone, settleDispute, submitMilestone } from '../../server/services/milestones'
import { startCheckout } from '../../server/services/payments'
import type { DealContext } from '../../server/services/deal-context'
import { PEOPLE, actorByEmail, dealTestContext, dealHttp, signedInParties, fundMilestone, makeOrder, schema } from '../support/deals'

let ctx: DealContext
let close: () => Promise<void>
let jar: Awaited<ReturnType<typeof signedInParties>>
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
  jar = await signedInParties()
})
afterAll(async () => {
  await close()
})

const { post, get } = dealHttp()
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)
const planOf = (orderId: number) => ctx.db.select().from(schema.milestones).where(eq(schema.milestones.orderId, orderId)).orderBy(asc(schema.milestones.position))
const orderRow = async (orderId: number) => (await ctx.db.select().from(schema.orders).where(eq(schema.orders.id, orderId)))[0]!
const changeRows = async (orderId: number) => ctx.db.select().from(schema.changeOrders).where(eq(schema.changeOrders.orderId, orderId))

/** $9,000.00 for the rest of the order, in two milestones that add up to it. */
const changeOrder = (overrides: Record<string, unknown> = {}) => ({
  totalCents: 900_000,
  milestones: [
    { title: 'Short block, second shop run', deliverable: 'Machined short block with measurements', amountCents: 500_000, dueDate: inDays(45) },
    { title: 'Dyno delivery', deliverable: 'Finished engine with the delivery pull', amountCents: 400_000, dueDate: inDays(90) },
  ],
  lineItems: [],
  notes: 'The block is re-sleeved; the plan for the rest changes.',
  ...overrides,
})

/**
 * An order of three milestones: the first paid, approved and released to the shop, the second paid and
 * refunded by an admin after a dispute, the third awaiting payment with an open payment page.
 */
async function orderWithRefund() {
  const order = await makeOrder(ctx)
  const [m1, m2, m3] = order.milestones as [typeof order.milestones[0], typeof order.milestones[0], typeof order.milestones[0]]
  await fundMilestone(ctx, order.racer, m1.id)
  await submitMilestone(ctx, order.shop, m1.id, { notes: 'Parts ordered.', proofFileIds: [], deliveryPullId: null })
  await approveMilestone(ctx, order.racer, m1.id)
  await fundMilestone(ctx, order.racer, m2.id)
  await disputeMilestone(ctx, order.racer, m2.id, 'The block came back cracked.')
  await settleDispute(ctx, await actorByEmail(ctx.db, PEOPLE.admin), m2.id, 'refund', 'Refunded: the block was not usable.')
  const { sessionId } = await startCheckout(ctx, order.racer, m3.id)
  const plan = await planOf(order.orderId)
  expect(plan.map(m => m.state)).toEqual(['released', 'refunded', 'awaiting_payment'])
  return { ...order, plan, sessionId }
}

describe('sending a change order', () => {
  it('is refused with 409 before any milestone was refunded, writing nothing', async () => {
    const { orderId } = await makeOrder(ctx)
    const res = await post(`/api/orders/${orderId}/change-orders`, changeOrder(), jar.shop)
    expect(res.status).toBe(409)
    expect(res.body.message).toContain('refunded')
    expect(await changeRows(orderId)).toHaveLength(0)
    expect((await get(`/api/orders/${orderId}`, jar.shop)).body.changeOrderAllowed).toBe(false)
  })

  it('is for the shop only: the racer 403, a stranger 404; bad input 400 and money that does not add up 422, nothing written', async () => {
    const { orderId } = await orderWithRefund()
    expect((await get(`/api/orders/${orderId}`, jar.shop)).body.changeOrderAllowed).toBe(true)
    expect((await get(`/api/orders/${orderId}`, jar.racer)).body.changeOrderAllowed).toBe(false)
    expect((await post(`/api/orders/${orderId}/change-orders`, changeOrder(), jar.racer)).status).toBe(403)
    expect((await post(`/api/orders/${orderId}/change-orders`, changeOrder(), jar.otherShop)).status).toBe(404)
    expect((await post(`/api/orders/${orderId}/change-orders`, changeOrder(), jar.otherRacer)).status).toBe(404)
    expect((await post(`/api/orders/${orderId}/change-orders`, changeOrder({ milestones: [] }), jar.shop)).status).toBe(400)
    expect((await post(`/api/orders/${orderId}/change-orders`, changeOrder({ totalCents: 12.5 }), jar.shop)).status).toBe(400)
    const short = await post(`/api/orders/${orderId}/change-orders`, changeOrder({ totalCents: 900_001 }), jar.shop)
    expect(short.status).toBe(422)
    expect(short.body.message).toContain('$9,000.00')
    const lines = await post(`/api/orders/${orderId}/change-orders`, changeOrder({
      lineItems: [{ category: 'Machine work', description: 'Re-sleeve the block', partNumber: '', quantity: 2, unitPriceCents: 400_000 }],
    }), jar.shop)
    expect(lines.status).toBe(422)
    expect(lines.body.message).toContain('$8,000.00')
    expect(await changeRows(orderId)).toHaveLength(0)
  })
})

describe('answering a change order', () => {
  it('on accepting, replaces only the unpaid milestones and keeps paid, refunded and released ones as they were', async () => {
    const { orderId, requestId, plan, sessionId } = await orderWithRefund()
    const before = await orderRow(orderId)
    const sent = await post(`/api/orders/${orderId}/change-orders`, changeOrder(), jar.shop)
    expect(sent.status).toBe(201)
    const changeId = sent.body.id as number
    // One open change order per order.
    expect((await post(`/api/orders/${orderId}/change-orders`, changeOrder(), jar.shop)).status).toBe(409)
    expect(await changeRows(orderId)).toHaveLength(1)
    const [racerMail] = await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.dedupeKey, `change-order:${changeId}`))
    expect(racerMail!.toAddress).toBe(PEOPLE.racer)
    const view = (await get(`/api/orders/${orderId}`, jar.racer)).body
    expect(view.changeOrder).toMatchObject({ id: changeId, status: 'open', totalCents: 900_000, replacedCents: plan[2]!.amountCents })

    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/accept`, {}, jar.shop)).status).toBe(403)
    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/accept`, {}, jar.otherRacer)).status).toBe(404)
    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/accept`, {}, jar.otherShop)).status).toBe(404)
    expect((await post(`/api/orders/${orderId}/change-orders/999999/accept`, {}, jar.racer)).status).toBe(404)
    expect((await planOf(orderId)).map(m => m.state)).toEqual(['released', 'refunded', 'awaiting_payment'])

    const accepted = await post(`/api/orders/${orderId}/change-orders/${changeId}/accept`, {}, jar.racer)
    expect(accepted.status).toBe(200)
    const after = await planOf(orderId)
    // The released and the refunded milestone: every column as it was.
    expect(after[0]).toEqual(plan[0])
    expect(after[1]).toEqual(plan[1])
    expect(after[2]).toMatchObject({ id: plan[2]!.id, state: 'cancelled', amountCents: plan[2]!.amountCents })
    expect(after.slice(3).map(m => ({ position: m.position, title: m.title, amountCents: m.amountCents, state: m.state }))).toEqual([
      { position: 3, title: 'Short block, second shop run', amountCents: 500_000, state: 'awaiting_payment' },
      { position: 4, title: 'Dyno delivery', amountCents: 400_000, state: 'awaiting_payment' },
    ])
    // The money adds up: the order total is every milestone that was not cancelled, and 5 % of $9,000.00
    // is shared across the new milestones to the cent.
    const order = await orderRow(orderId)
    expect(order.totalCents).toBe(before.totalCents - plan[2]!.amountCents + 900_000)
    expect(order.totalCents).toBe(after.filter(m => m.state !== 'cancelled').reduce((a, m) => a + m.amountCents, 0))
    expect(after.slice(3).reduce((a, m) => a + m.feeCents, 0)).toBe(45_000)
    expect(order.platformFeeCents).toBe(after.filter(m => m.state !== 'cancelled').reduce((a, m) => a + m.feeCents, 0))
    expect(accepted.body.totalCents).toBe(order.totalCents)
    // The replaced milestone's open payment page is expired at the payment service.
    const [page] = await ctx.db.select().from(schema.payments).where(eq(schema.payments.stripeCheckoutSessionId, sessionId))
    expect(page!.status).toBe('expired')
    // The history, the thread and the shop's e-mail, written with it.
    const events = await ctx.db.select().from(schema.dealEvents).where(and(eq(schema.dealEvents.orderId, orderId), like(schema.dealEvents.action, 'change_order_%')))
    expect(events.map(e => e.action)).toEqual(['change_order_sent', 'change_order_accepted'])
    const [notes] = await ctx.db.select({ n: count() }).from(schema.requestMessages).where(and(eq(schema.requestMessages.requestId, requestId), like(schema.requestMessages.body, '%change order%')))
    expect(notes!.n).toBe(2)
    const [shopMail] = await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.dedupeKey, `change-order:${changeId}:accepted`))
    expect(shopMail!.toAddress).toBe(PEOPLE.shop)
    // Answered once.
    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/accept`, {}, jar.racer)).status).toBe(409)
    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/decline`, {}, jar.racer)).status).toBe(409)
    expect(await planOf(orderId)).toHaveLength(5)
  })

  it('on declining, leaves the order exactly as it was', async () => {
    const { orderId, plan } = await orderWithRefund()
    const before = await orderRow(orderId)
    const sent = await post(`/api/orders/${orderId}/change-orders`, changeOrder(), jar.shop)
    expect(sent.status).toBe(201)
    const changeId = sent.body.id as number
    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/decline`, { reason: 'x'.repeat(1001) }, jar.racer)).status).toBe(400)
    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/decline`, {}, jar.shop)).status).toBe(403)
    expect((await post(`/api/orders/${orderId}/change-orders/${changeId}/decline`, {}, jar.otherRacer)).status).toBe(404)
    const declined = await post(`/api/orders/${orderId}/change-orders/${changeId}/decline`, { reason: 'I will find the block myself.' }, jar.racer)
    expect(declined.status).toBe(200)
    expect(await planOf(orderId)).toEqual(plan)
    const order = await orderRow(orderId)
    expect({ total: order.totalCents, fee: order.platformFeeCents, status: order.status }).toEqual({ total: before.totalCents, fee: before.platformFeeCents, status: 'active' })
    expect((await changeRows(orderId))[0]).toMatchObject({ status: 'declined', declineReason: 'I will find the block myself.' })
    const [shopMail] = await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.dedupeKey, `change-order:${changeId}:declined`))
    expect(shopMail!.toAddress).toBe(PEOPLE.shop)
    // Once answered, the shop may send another.
    expect((await get(`/api/orders/${orderId}`, jar.shop)).body.changeOrderAllowed).toBe(true)
  })
})
