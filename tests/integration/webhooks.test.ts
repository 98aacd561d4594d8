// POST /api/webhooks/stripe on the built app: the signature is checked over the raw body (400 and
// nothing changed otherwise), each event id is processed once, and events that arrive out of order
// end in the right state. Signatures made with the SDK's own generateTestHeaderString.
import { count, eq } from 'drizzle-orm'
import Stripe from 'stripe'
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest'
import type { DealContext } from '../../server/services/deal-context'
import { approveMilestone, cancelOrder, submitMilestone } from '../../server/services/milestones'
import { startCheckout } from '../../server/services/payments'
import { api } from '../support/context'
import { dealTestContext, fundMilestone, makeOrder, milestoneRow, schema } from '../support/deals'
import { CARDS, eventually, payOnFakePage } from '../support/payments'

let ctx: DealContext
let close: () => Promise<void>
const secret = () => inject('paymentsKeys').webhookSecret
const fake = (path: string, method = 'GET') => fetch(`${inject('paymentsUrl')}${path}`, { method }).then(r => r.json())

beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
})
afterEach(async () => {
  await fake('/_fake/webhooks/release', 'POST')
})
afterAll(async () => {
  await close()
})

function post(payload: string, signature?: string) {
  const headers: Record<string, string> = { 'content-type': 'application/json' }
  if (signature !== undefined) headers['stripe-signature'] = signature
  return api('/api/webhooks/stripe', { method: 'POST', headers, body: payload })
}

const sign = (payload: string, options: { secret?: string, timestamp?: number } = {}) =>
  Stripe.webhooks.generateTestHeaderString({ payload, secret: options.secret ?? secret(), timestamp: options.timestamp })

const eventCount = async () => (await ctx.db.select({ n: count() }).from(schema.stripeEvents))[0]!.n

/** A real completed session's event, as the fake made it (delivery held, so the test decides when the app sees it). */
async function heldCompletion() {
  const { racer, milestones, orderId } = await makeOrder(ctx)
  const m = milestones[0]!
  await fake('/_fake/webhooks/hold', 'POST')
  const { url, sessionId } = await startCheckout(ctx, racer, m.id)
  await payOnFakePage(url, CARDS.succeeds)
  const events = await fake('/_fake/events') as { id: string, type: string, objectId: string }[]
  const completed = events.find(e => e.type === 'checkout.session.completed' && e.objectId === sessionId)!
  const payload = await rawEvent(completed.id)
  return { racer, m, orderId, sessionId, event: JSON.parse(payload) as { id: string }, payload }
}

/** An event exactly as the fake sends it: its stored object, pretty-printed. */
async function rawEvent(id: string): Promise<string> {
  const res = await fetch(`${inject('paymentsUrl')}/v1/events/${id}`, { headers: { authorization: `Bearer ${inject('paymentsKeys').secretKey}` } })
  return JSON.stringify(await res.json(), null, 2)
}

describe('signature', () => {
  it('answers 400 without a Stripe-Signature header, with a wrong secret, or for a tampered body, and changes nothing', async () => {
    const { m, payload } = await heldCompletion()
    const before = await eventCount()
    const missing = await post(payload)
    expect(missing.status).toBe(400)
    expect(missing.body.message).toContain('Stripe-Signature')
    const wrong = await post(payload, sign(payload, { secret: 'whsec_not_the_app_secret' }))
    expect(wrong.status).toBe(400)
    expect(wrong.body.message).toContain('signature')
    const tampered = payload.replace(`"amount_total": ${m.amountCents}`, '"amount_total": 1')
    expect(tampered).not.toBe(payload)
    expect((await post(tampered, sign(payload))).status).toBe(400)
    const garbage = await post(payload, 't=1,v1=deadbeef')
    expect(garbage.status).toBe(400)
    expect(await eventCount()).toBe(before)
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('awaiting_payment')
  })

  it('refuses a correctly signed delivery replayed after the five-minute tolerance (SDK default)', async () => {
    const { m, payload } = await heldCompletion()
    const old = await post(payload, sign(payload, { timestamp: Math.floor(Date.now() / 1000) - 600 }))
    expect(old.status).toBe(400)
    expect(old.body.message).toContain('tolerance')
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('awaiting_payment')
  })

  it('verifies the raw bytes: the fake\'s pretty-printed JSON, not a re-serialisation', async () => {
    const { m, payload } = await heldCompletion()
    const compact = JSON.stringify(JSON.parse(payload))
    expect((await post(compact, sign(payload))).status).toBe(400)
    const ok = await post(payload, sign(payload))
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ received: true, duplicate: false, outcome: `milestone ${m.id} funded` })
  })
})

describe('once only', () => {
  it('ignores a replayed event: the milestone is funded once, one payment, one set of e-mails', async () => {
    const { m, payload, event } = await heldCompletion()
    const first = await post(payload, sign(payload))
    expect(first.body.duplicate).toBe(false)
    const again = await post(payload, sign(payload))
    expect(again.status).toBe(200)
    expect(again.body).toMatchObject({ duplicate: true, outcome: 'already processed' })
    // and the same event from the fake itself, re-sent
    await fake(`/_fake/events/${event.id}/resend`, 'POST')
    await fake('/_fake/webhooks/release', 'POST')
    await new Promise(r => setTimeout(r, 500))
    const rows = await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.eventId, event.id))
    expect(rows).toHaveLength(1)
    expect((await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, m.id)))).toHaveLength(1)
    const mails = await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.dedupeKey, `funded:${m.id}:racer`))
    expect(mails).toHaveLength(1)
  })

  it('processes one of two identical deliveries that arrive at the same moment', async () => {
    const { m, payload } = await heldCompletion()
    const [a, b] = await Promise.all([post(payload, sign(payload)), post(payload, sign(payload))])
    expect([a.body.duplicate, b.body.duplicate].sort()).toEqual([false, true])
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('funded')
  })

  it('answers 200 and changes nothing for an event type the app does not use', async () => {
    const payload = JSON.stringify({ id: `evt_unused_${Date.now()}`, object: 'event', type: 'customer.created', data: { object: { id: 'cus_1', object: 'customer' } }, created: 1, livemode: false, api_version: null, pending_webhooks: 1, request: null })
    const res = await post(payload, sign(payload))
    expect(res.status).toBe(200)
    expect(res.body.outcome).toContain('ignored')
  })
})

describe('out of order', () => {
  it('stays funded when a decline arrives after the payment that followed it', async () => {
    const { racer, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    await fake('/_fake/webhooks/hold', 'POST')
    const { url, sessionId } = await startCheckout(ctx, racer, m.id)
    await payOnFakePage(url, CARDS.declined)
    await payOnFakePage(url, CARDS.succeeds)
    const events = await fake('/_fake/events') as { id: string, type: string, objectId: string }[]
    const completed = events.find(e => e.type === 'checkout.session.completed' && e.objectId === sessionId)!
    const session = await ctx.stripe.checkout.sessions.retrieve(sessionId)
    const failed = events.filter(e => e.type === 'payment_intent.payment_failed' && e.objectId === session.payment_intent).at(-1)!
    await fake(`/_fake/events/${completed.id}/resend`, 'POST')
    await eventually('funded', async () => (await milestoneRow(ctx.db, m.id)).state === 'funded')
    await fake(`/_fake/events/${failed.id}/resend`, 'POST')
    await eventually('the decline processed', async () => (await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.eventId, failed.id)))[0])
    const [processed] = await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.eventId, failed.id))
    expect(processed!.outcome).toContain('ignored')
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('funded')
    const [payment] = await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, m.id))
    expect(payment!.failureMessage).toBeNull()
  })

  it('ends refunded when a refund made at the payment service arrives before the payment\'s completion', async () => {
    const { m, sessionId, event } = await heldCompletion()
    const session = await ctx.stripe.checkout.sessions.retrieve(sessionId)
    await ctx.stripe.refunds.create({ payment_intent: session.payment_intent as string })
    const events = await fake('/_fake/events') as { id: string, type: string, objectId: string }[]
    const pi = await ctx.stripe.paymentIntents.retrieve(session.payment_intent as string)
    const refunded = events.find(e => e.type === 'charge.refunded' && e.objectId === pi.latest_charge)!
    await fake(`/_fake/events/${refunded.id}/resend`, 'POST')
    await eventually('refunded', async () => (await milestoneRow(ctx.db, m.id)).state === 'refunded')
    await fake(`/_fake/events/${event.id}/resend`, 'POST')
    await eventually('the completion processed', async () => (await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.eventId, event.id)))[0])
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('refunded')
    const rows = await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, m.id))
    expect(rows.map(r => [r.kind, r.status]).sort()).toEqual([['checkout', 'succeeded'], ['refund', 'succeeded']])
  })

  it('refunds a payment that completes after its order was cancelled', async () => {
    const { racer, m, orderId, event } = await heldCompletion()
    await cancelOrder(ctx, racer, orderId, 'Found a used engine instead.')
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('cancelled')
    await fake(`/_fake/events/${event.id}/resend`, 'POST')
    const processed = await eventually('the completion processed', async () => (await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.eventId, event.id)))[0])
    expect(processed.outcome).toContain('cancelled')
    const rows = await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, m.id))
    const refund = rows.find(r => r.kind === 'refund')!
    expect(refund.amountCents).toBe(m.amountCents)
    expect((await ctx.stripe.refunds.retrieve(refund.stripeRefundId!)).status).toBe('succeeded')
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('cancelled')
  })

  it('leaves a funded milestone funded when a stale expiry of an older session arrives', async () => {
    const { racer, milestones } = await makeOrder(ctx)
    const m = milestones[0]!
    await fundMilestone(ctx, racer, m.id)
    const payload = JSON.stringify({ id: `evt_stale_${Date.now()}`, object: 'event', type: 'checkout.session.expired', data: { object: { id: 'cs_test_never_ours', object: 'checkout.session', metadata: { milestone_id: String(m.id) } } }, created: 1, livemode: false, api_version: null, pending_webhooks: 1, request: null })
    const res = await post(payload, sign(payload))
    expect(res.body.outcome).toContain('ignored')
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('funded')
  })
})

describe('a late second payment', () => {
  it('refunds the second payment without touching the first: the first row keeps its payment, the refund points at the second, the milestone stays funded and pays out from the first', async () => {
    const { racer, shop, milestones, orderId } = await makeOrder(ctx)
    const m = milestones[0]!
    const { sessionId: firstSession } = await fundMilestone(ctx, racer, m.id)
    const [first] = await ctx.db.select().from(schema.payments).where(eq(schema.payments.stripeCheckoutSessionId, firstSession))
    // A second page for the same milestone (as one left open in another tab would be), paid after the first.
    const second = await ctx.stripe.checkout.sessions.create({
      mode: 'payment',
      line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount: m.amountCents, product_data: { name: m.title } } }],
      success_url: `${ctx.config.siteUrl}/deals/orders/${orderId}/paid`,
      metadata: { milestone_id: String(m.id), order_id: String(orderId), attempt: '0' },
      payment_intent_data: { metadata: { milestone_id: String(m.id), order_id: String(orderId) } },
    })
    expect((await payOnFakePage(second.url!, CARDS.succeeds)).status).toBe(303)
    const secondIntent = (await ctx.stripe.checkout.sessions.retrieve(second.id)).payment_intent as string
    const secondCharge = (await ctx.stripe.paymentIntents.retrieve(secondIntent)).latest_charge as string
    // The app refunds it on the completion event; then the refund's own event comes in.
    const refunded = await eventually('the second charge\'s refund event', async () => {
      const events = await fake('/_fake/events') as { id: string, type: string, objectId: string }[]
      return events.find(e => e.type === 'charge.refunded' && e.objectId === secondCharge)
    })
    const processed = await eventually('the refund event processed', async () => (await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.eventId, refunded.id)))[0])
    expect(processed.outcome).not.toContain(`milestone ${m.id} refunded`)

    const rows = await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, m.id))
    const firstNow = rows.find(r => r.id === first!.id)!
    expect(firstNow).toMatchObject({ kind: 'checkout', status: 'succeeded', stripePaymentIntentId: first!.stripePaymentIntentId, stripeChargeId: first!.stripeChargeId })
    const refunds = rows.filter(r => r.kind === 'refund')
    expect(refunds).toHaveLength(1)
    expect(refunds[0]).toMatchObject({ stripePaymentIntentId: secondIntent, amountCents: m.amountCents })
    expect(rows.find(r => r.stripeCheckoutSessionId === second.id)).toMatchObject({ kind: 'checkout', status: 'succeeded', stripePaymentIntentId: secondIntent })
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('funded')
    // At the payment service the first deposit is still captured and unrefunded, the second refunded in full.
    const chargeOf = async (pi: string) => (await ctx.stripe.paymentIntents.retrieve(pi, { expand: ['latest_charge'] })).latest_charge as Stripe.Charge
    expect(await chargeOf(first!.stripePaymentIntentId!)).toMatchObject({ id: first!.stripeChargeId, refunded: false, amount_refunded: 0 })
    expect(await chargeOf(secondIntent)).toMatchObject({ id: secondCharge, refunded: true, amount_refunded: m.amountCents })

    // The milestone carries on: the payout is made from the first charge, the one that funds it.
    await submitMilestone(ctx, shop, m.id, { notes: 'Parts ordered.', proofFileIds: [], deliveryPullId: null })
    expect(await approveMilestone(ctx, racer, m.id)).toEqual({ released: true, problem: null })
    const transfer = (await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, m.id))).find(r => r.kind === 'transfer')!
    expect((await ctx.stripe.transfers.retrieve(transfer.stripeTransferId!)).source_transaction).toBe(first!.stripeChargeId)
  })
})
