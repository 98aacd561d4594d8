// The deal lifecycle through the services, against the real test database and the running payments
// fake, whose signed webhooks go to the built app's /api/webhooks/stripe: success, decline, refund,
// dispute, cancel, automatic approval and the reliability rules of issue 7.
import { and, count, eq } from 'drizzle-orm'
import { createStorage } from 'unstorage'
import memoryDriver from 'unstorage/drivers/memory'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { cancelOrder, approveMilestone, autoApproveDue, disputeMilestone, recordDeliveryPull, releaseMilestone, settleDispute, submitMilestone } from '../../server/services/milestones'
import { startCheckout } from '../../server/services/payments'
import type { DealContext } from '../../server/services/deal-context'
import { CARDS, eventually, payOnFakePage } from '../support/payments'
import { PEOPLE, actorByEmail, dealTestContext, fundMilestone, makeOrder, milestoneRow, schema } from '../support/deals'

let ctx: DealContext
let close: () => Promise<void>
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
})
afterAll(async () => {
  await close()
})

const paymentsOf = (milestoneId: number) => ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, milestoneId))
const statusOf = async (p: Promise<unknown>) => p.then(() => 200, (e: { statusCode?: number }) => e.statusCode ?? 500)

describe('paying a milestone', () => {
  it('funds the first deposit only once the fake\'s signed webhook reaches the app', async () => {
    const { racer, milestones, orderId } = await makeOrder(ctx)
    const first = milestones[0]!
    const { url, sessionId } = await startCheckout(ctx, racer, first.id)
    expect(url).toContain('/pay/cs_test_')
    // Being sent to the page changes nothing: only the webhook funds.
    expect((await milestoneRow(ctx.db, first.id)).state).toBe('awaiting_payment')
    const page = await payOnFakePage(url, CARDS.succeeds)
    expect(page.status).toBe(303)
    expect(page.location).toBe(`${ctx.config.siteUrl}/deals/orders/${orderId}/paid?milestone=${first.id}&session=${sessionId}`)
    await eventually('funded', async () => (await milestoneRow(ctx.db, first.id)).state === 'funded')
    const [payment] = await paymentsOf(first.id)
    expect(payment).toMatchObject({ kind: 'checkout', status: 'succeeded', amountCents: 738_000, stripeCheckoutSessionId: sessionId })
    expect(payment!.stripePaymentIntentId).toMatch(/^pi_/)
    expect(payment!.stripeChargeId).toMatch(/^ch_/)
    const [processed] = await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.outcome, `milestone ${first.id} funded`))
    expect(processed!.type).toBe('checkout.session.completed')
    // The fee is shared among the milestones to the cent: 5 % of $24,600.00 is $1,230.00.
    expect(milestones.map(m => m.feeCents)).toEqual([36_900, 49_200, 36_900])
  })

  it('gives a double click one Checkout Session (locked row and idempotency key)', async () => {
    const { racer, milestones } = await makeOrder(ctx)
    const clicks = await Promise.all([1, 2, 3].map(() => startCheckout(ctx, racer, milestones[0]!.id)))
    expect(new Set(clicks.map(c => c.sessionId)).size).toBe(1)
    const rows = await paymentsOf(milestones[0]!.id)
    expect(rows).toHaveLength(1)
    expect(rows[0]!.attempt).toBe(0)
  })

  it('opens a new session (a new attempt key) once the old one has expired', async () => {
    const { racer, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    const first = await startCheckout(ctx, racer, m.id)
    await ctx.stripe.checkout.sessions.expire(first.sessionId)
    await eventually('the expiry recorded', async () => (await milestoneRow(ctx.db, m.id)).checkoutAttempt === 1)
    const second = await startCheckout(ctx, racer, m.id)
    expect(second.sessionId).not.toBe(first.sessionId)
    const rows = await paymentsOf(m.id)
    expect(rows.map(r => [r.attempt, r.status])).toEqual([[0, 'expired'], [1, 'open']])
  })

  it('refuses a deposit out of order, a payment by the shop, and a milestone already paid', async () => {
    const { racer, shop, milestones } = await makeOrder(ctx)
    expect(await statusOf(startCheckout(ctx, racer, milestones[1]!.id))).toBe(409)
    expect(await statusOf(startCheckout(ctx, shop, milestones[0]!.id))).toBe(403)
    const stranger = await actorByEmail(ctx.db, PEOPLE.otherRacer)
    expect(await statusOf(startCheckout(ctx, stranger, milestones[0]!.id))).toBe(404)
    await fundMilestone(ctx, racer, milestones[0]!.id)
    expect(await statusOf(startCheckout(ctx, racer, milestones[0]!.id))).toBe(409)
  })

  it('leaves a declined card\'s milestone unpaid with the decline message, and funds it when a good card follows', async () => {
    const { racer, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    const { url } = await startCheckout(ctx, racer, m.id)
    const declined = await payOnFakePage(url, CARDS.declined)
    expect(declined.status).toBe(402)
    const problem = await eventually('the decline recorded', async () => (await paymentsOf(m.id))[0]?.failureMessage ?? undefined)
    expect(problem).toBe('Your card was declined.')
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('awaiting_payment')
    const good = await payOnFakePage(url, CARDS.succeeds)
    expect(good.status).toBe(303)
    await eventually('funded', async () => (await milestoneRow(ctx.db, m.id)).state === 'funded')
    expect((await paymentsOf(m.id))[0]!.failureMessage).toBeNull()
  })
})

describe('release', () => {
  it('submits, approves and releases: a transfer of the amount less the fee to the shop\'s connected account', async () => {
    const { racer, shop, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    await fundMilestone(ctx, racer, m.id)
    await submitMilestone(ctx, shop, m.id, { notes: 'Parts ordered; invoices attached.', proofFileIds: [], deliveryPullId: null })
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('submitted')
    const result = await approveMilestone(ctx, racer, m.id)
    expect(result).toEqual({ released: true, problem: null })
    const after = await milestoneRow(ctx.db, m.id)
    expect(after.state).toBe('released')
    const transfer = (await paymentsOf(m.id)).find(p => p.kind === 'transfer')!
    expect(transfer.amountCents).toBe(738_000 - 36_900)
    const atStripe = await ctx.stripe.transfers.retrieve(transfer.stripeTransferId!)
    const [account] = await ctx.db.select().from(schema.payoutAccounts).where(eq(schema.payoutAccounts.shopId, shop.shopId!))
    expect(atStripe.destination).toBe(account!.stripeAccountId)
    expect(atStripe.amount).toBe(701_100)
  })

  it('never releases before funding, never twice, and never twice when two releases race', async () => {
    const { racer, shop, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    expect(await statusOf(releaseMilestone(ctx, m.id))).toBe(409)
    expect(await statusOf(submitMilestone(ctx, shop, m.id, { notes: 'early', proofFileIds: [], deliveryPullId: null }))).toBe(409)
    await fundMilestone(ctx, racer, m.id)
    expect(await statusOf(releaseMilestone(ctx, m.id))).toBe(409)
    await submitMilestone(ctx, shop, m.id, { notes: 'Done.', proofFileIds: [], deliveryPullId: null })
    // An approval whose payout is still to be made, as after a payment-service outage.
    await ctx.db.update(schema.milestones).set({ state: 'approved' }).where(eq(schema.milestones.id, m.id))
    const outcomes = await Promise.all([statusOf(releaseMilestone(ctx, m.id)), statusOf(releaseMilestone(ctx, m.id))])
    expect(outcomes.sort()).toEqual([200, 409])
    expect(await statusOf(releaseMilestone(ctx, m.id))).toBe(409)
    const transfers = (await paymentsOf(m.id)).filter(p => p.kind === 'transfer')
    expect(transfers).toHaveLength(1)
  })

  it('approves on its own after the configured days, and pays out', async () => {
    const { racer, shop, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    await fundMilestone(ctx, racer, m.id)
    await submitMilestone(ctx, shop, m.id, { notes: 'Done.', proofFileIds: [], deliveryPullId: null })
    const submittedAt = (await milestoneRow(ctx.db, m.id)).submittedAt!
    const early = await autoApproveDue({ ...ctx, now: () => new Date(submittedAt.getTime() + 6 * 86_400_000) })
    expect(early.approved).toBe(0)
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('submitted')
    await autoApproveDue({ ...ctx, now: () => new Date(submittedAt.getTime() + 7 * 86_400_000 + 1000) })
    const after = await milestoneRow(ctx.db, m.id)
    expect(after.autoApproved).toBe(true)
    expect(after.state).toBe('released')
  })
})

describe('dispute and refund', () => {
  it('holds a disputed deposit until an admin refunds it; the refund is made at the fake', async () => {
    const { racer, shop, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    await fundMilestone(ctx, racer, m.id)
    expect(await statusOf(disputeMilestone(ctx, shop, m.id, 'no'))).toBe(403)
    await disputeMilestone(ctx, racer, m.id, 'No parts invoices after three weeks.')
    expect(await statusOf(approveMilestone(ctx, racer, m.id))).toBe(409)
    expect(await statusOf(settleDispute(ctx, racer, m.id, 'refund', 'Refund me.'))).toBe(403)
    const admin = await actorByEmail(ctx.db, PEOPLE.admin)
    await settleDispute(ctx, admin, m.id, 'refund', 'No evidence of work.')
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('refunded')
    const refund = (await paymentsOf(m.id)).find(p => p.kind === 'refund')!
    expect(refund.amountCents).toBe(738_000)
    const atStripe = await ctx.stripe.refunds.retrieve(refund.stripeRefundId!)
    expect(atStripe.status).toBe('succeeded')
    // One audit row for the decision, carrying the refund.
    const audit = await ctx.db.select().from(schema.auditLog).where(and(eq(schema.auditLog.entityType, 'milestone'), eq(schema.auditLog.entityId, m.id)))
    expect(audit).toHaveLength(1)
    expect(audit[0]).toMatchObject({ action: 'dispute.settle', actorId: admin.id, after: { state: 'refunded', refund: refund.stripeRefundId } })
    // Settled once: a second settlement changes nothing.
    expect(await statusOf(settleDispute(ctx, admin, m.id, 'release', 'Released after all.'))).toBe(409)
  })

  it('settles a dispute in the shop\'s favour by releasing, and then refuses any refund of released money', async () => {
    const { racer, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    await fundMilestone(ctx, racer, m.id)
    await disputeMilestone(ctx, racer, m.id, 'Unsure about the parts list.')
    const admin = await actorByEmail(ctx.db, PEOPLE.admin)
    expect(await settleDispute(ctx, admin, m.id, 'release', 'Invoices check out.')).toEqual({ state: 'released', problem: null })
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('released')
    expect(await statusOf(disputeMilestone(ctx, racer, m.id, 'again'))).toBe(409)
    expect(await statusOf(settleDispute(ctx, admin, m.id, 'refund', 'Refunded after all.'))).toBe(409)
    expect((await paymentsOf(m.id)).filter(p => p.kind === 'refund')).toHaveLength(0)
  })
})

describe('cancelling an order', () => {
  it('refunds what is held, keeps what was released, cancels what is unpaid and expires its open page', async () => {
    const { racer, shop, milestones, orderId } = await makeOrder(ctx)
    const [m1, m2, m3] = milestones as [typeof milestones[0], typeof milestones[0], typeof milestones[0]]
    await fundMilestone(ctx, racer, m1.id)
    await submitMilestone(ctx, shop, m1.id, { notes: 'Done.', proofFileIds: [], deliveryPullId: null })
    await approveMilestone(ctx, racer, m1.id)
    await fundMilestone(ctx, racer, m2.id)
    const { sessionId } = await startCheckout(ctx, racer, m3.id)
    const stranger = await actorByEmail(ctx.db, PEOPLE.otherRacer)
    expect(await statusOf(cancelOrder(ctx, stranger, orderId, 'not mine'))).toBe(404)
    const { refundedCents } = await cancelOrder(ctx, racer, orderId, 'Changed class, the engine is no longer legal.')
    expect(refundedCents).toBe(m2.amountCents)
    expect((await milestoneRow(ctx.db, m1.id)).state).toBe('released')
    expect((await milestoneRow(ctx.db, m2.id)).state).toBe('refunded')
    expect((await milestoneRow(ctx.db, m3.id)).state).toBe('cancelled')
    expect((await ctx.stripe.checkout.sessions.retrieve(sessionId)).status).toBe('expired')
    const [order] = await ctx.db.select().from(schema.orders).where(eq(schema.orders.id, orderId))
    expect(order!.status).toBe('cancelled')
    expect(await statusOf(cancelOrder(ctx, racer, orderId, 'twice'))).toBe(409)
    const [refunds] = await ctx.db.select({ n: count() }).from(schema.payments).where(and(eq(schema.payments.milestoneId, m1.id), eq(schema.payments.kind, 'refund')))
    expect(refunds!.n).toBe(0)
  })
})

describe('a guaranteed final milestone', () => {
  // An invented curve: torque rising to ~585 lb·ft near 5,400 rpm, on a 427.6 ci V8 (4.125 × 4.000 in).
  const curve = (scale: number) => {
    const rows = ['RPM,Torque (lb-ft),Power (hp)']
    for (let rpm = 3000; rpm <= 7200; rpm += 100) {
      const tq = scale * (585 - 0.000018 * (rpm - 5400) ** 2 - 0.000000004 * (rpm - 5400) ** 3)
      rows.push(`${rpm},${tq.toFixed(1)},${(tq * rpm / 5252).toFixed(1)}`)
    }
    return rows.join('\n')
  }
  const fields = { declaredStandard: 'SAE_J1349_2004' as const, baroInHg: 29.6, airTempF: 72, humidityPct: 35, boreIn: 4.125, strokeIn: 4.0, cylinders: 8 }

  it('can be submitted only with a verified delivery pull that meets the target under the quoted standard', async () => {
    const storage = createStorage({ driver: memoryDriver() })
    const { racer, shop, milestones } = await makeOrder(ctx, { quote: { guarantee: { hp: 720, tolerancePct: 2, standard: 'SAE_J1349_2004' } } })
    const last = milestones[2]!
    expect(last.guaranteed).toBe(true)
    for (const m of milestones) await fundMilestone(ctx, racer, m.id)
    const upload = async (text: string) => {
      const key = `tests/delivery-${Math.random().toString(36).slice(2)}.csv`
      await storage.setItemRaw(key, Buffer.from(text))
      const [row] = await ctx.db.insert(schema.files).values({ ownerId: shop.id, kind: 'pull', mime: 'text/csv', sizeBytes: text.length, sha256: 'x'.repeat(64), storageKey: key, originalName: 'delivery.csv' }).$returningId()
      return row!.id
    }
    // Milestones are done in order: the delivery cannot be handed in while earlier work is untouched.
    const early = await submitMilestone(ctx, shop, last.id, { notes: 'Delivered.', proofFileIds: [], deliveryPullId: null }).catch(e => e)
    expect(early.statusCode).toBe(409)
    expect(early.message).toContain(`"${milestones[0]!.title}" comes first`)
    for (const m of milestones.slice(0, 2)) {
      await submitMilestone(ctx, shop, m.id, { notes: 'Done as quoted.', proofFileIds: [], deliveryPullId: null })
      await approveMilestone(ctx, racer, m.id)
    }
    expect(await statusOf(submitMilestone(ctx, shop, last.id, { notes: 'Delivered.', proofFileIds: [], deliveryPullId: null }))).toBe(422)

    const weak = await recordDeliveryPull(ctx, storage, shop, last.id, await upload(curve(1.0)), fields)
    expect(weak.status).toBe('verified')
    expect(weak.minimumHp).toBe(705.6)
    expect(weak.meetsTarget).toBe(false)
    expect(weak.peakHp).toBeLessThan(705.6)
    expect(await statusOf(submitMilestone(ctx, shop, last.id, { notes: 'Delivered.', proofFileIds: [], deliveryPullId: weak.id }))).toBe(422)

    const strong = await recordDeliveryPull(ctx, storage, shop, last.id, await upload(curve(1.05)), fields)
    expect(strong.status).toBe('verified')
    expect(strong.meetsTarget).toBe(true)
    expect(strong.standard).toBe('SAE_J1349_2004')
    await submitMilestone(ctx, shop, last.id, { notes: 'Delivered with the pull.', proofFileIds: [], deliveryPullId: strong.id })
    expect((await milestoneRow(ctx.db, last.id)).state).toBe('submitted')
    expect(await statusOf(recordDeliveryPull(ctx, storage, racer, last.id, await upload(curve(1.1)), fields))).toBe(403)
  })
})
