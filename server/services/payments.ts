// Money through Stripe's SDK: a Checkout Session per milestone payment (one per attempt, by
// idempotency key), refunds, transfers to the shop's connected account, and the webhook events that
// confirm them. A milestone is marked funded only here, from a verified `checkout.session.completed`.
import { and, asc, desc, eq } from 'drizzle-orm'
import { createError } from 'h3'
import type Stripe from 'stripe'
import { CURRENCY } from '../../shared/money'
import {
  shops, milestones, orders, payments, payoutAccounts, stripeEvents, users, type Milestone, type Order, type Payment,
} from '../database/schema'
import { inRetriedTransaction } from '../utils/transaction'
import {
  type DealActor, type DealContext, type DbTransaction, conflict, forbidden, isDuplicateKey, notFound, partiesOf, paymentServiceError,
  recordDealEvent,
} from './deal-context'
import { postEvent } from './deals'
import { writeAudit } from './audit'
import { enqueueMail } from './outbox'

/** The idempotency key of a milestone's n-th Checkout attempt: a double click sends the same one. */
export const checkoutKey = (milestoneId: number, attempt: number) => `milestone-${milestoneId}-checkout-${attempt}`

/** Locks an order, then one of its milestones, in that order everywhere (so two transactions never wait on each other in a circle). */
export async function lockMilestone(tx: DbTransaction, milestoneId: number): Promise<{ order: Order, milestone: Milestone }> {
  const [peek] = await tx.select({ orderId: milestones.orderId }).from(milestones).where(eq(milestones.id, milestoneId)).limit(1)
  if (!peek) throw notFound('That milestone')
  const [order] = await tx.select().from(orders).where(eq(orders.id, peek.orderId)).limit(1).for('update')
  const [milestone] = await tx.select().from(milestones).where(eq(milestones.id, milestoneId)).limit(1).for('update')
  return { order: order!, milestone: milestone! }
}

/** 404 unless the actor is a party to the order (or an admin). */
export function assertParty(actor: DealActor, order: Order): 'racer' | 'builder' | 'admin' {
  if (order.racerId === actor.id) return 'racer'
  if (actor.shopId !== null && order.shopId === actor.shopId) return 'builder'
  if (actor.role === 'admin') return 'admin'
  throw notFound('That milestone')
}

/**
 * The payment that funds a milestone: its succeeded Checkout payment with no refund against its
 * payment intent, the earliest if (wrongly) more than one. A second payment that came in late and was
 * refunded is never the one a release pays out from or a refund gives back. Read under the milestone's lock.
 */
export async function fundingPayment(tx: DbTransaction, milestoneId: number): Promise<Payment | null> {
  const rows = await tx.select().from(payments).where(eq(payments.milestoneId, milestoneId)).orderBy(asc(payments.id)).for('update')
  const refunded = new Set(rows.filter(r => r.kind === 'refund').map(r => r.stripePaymentIntentId))
  return rows.find(r => r.kind === 'checkout' && r.status === 'succeeded' && !refunded.has(r.stripePaymentIntentId)) ?? null
}

/**
 * Sends the racer to pay one milestone: the open Checkout Session of the current attempt if there is
 * one, else a new one made with the attempt's idempotency key. The milestone row is locked meanwhile,
 * so a double click waits and then gets the same session.
 */
export async function startCheckout(ctx: DealContext, actor: DealActor, milestoneId: number): Promise<{ url: string, sessionId: string, reused: boolean }> {
  // Safe to run again after a lock conflict: the session is made with the attempt's idempotency key.
  return inRetriedTransaction(ctx.db, async (tx) => {
    const { order, milestone } = await lockMilestone(tx, milestoneId)
    const side = assertParty(actor, order)
    if (side !== 'racer') throw forbidden('Only the racer pays the milestones of an order.')
    if (order.status !== 'active') throw conflict(`This order is ${order.status}; nothing more can be paid on it.`)
    if (milestone.state !== 'awaiting_payment') throw conflict(`This milestone is already paid (it is ${milestone.state.replace('_', ' ')}).`)
    const [earlier] = await tx.select({ id: milestones.id }).from(milestones)
      .where(and(eq(milestones.orderId, order.id), eq(milestones.state, 'awaiting_payment'))).orderBy(milestones.position).limit(1)
    if (earlier && earlier.id !== milestone.id) throw conflict('Pay the earlier milestone first: deposits are paid in order.')
    let attempt = milestone.checkoutAttempt
    const [open] = await tx.select().from(payments)
      .where(and(eq(payments.milestoneId, milestoneId), eq(payments.kind, 'checkout'), eq(payments.status, 'open'), eq(payments.attempt, attempt))).limit(1).for('update')
    if (open?.stripeCheckoutSessionId) {
      const session = await ctx.stripe.checkout.sessions.retrieve(open.stripeCheckoutSessionId).catch((e) => {
        throw paymentServiceError('look up the payment page', e)
      })
      if (session.status === 'open' && session.url) return { url: session.url, sessionId: session.id, reused: true }
      if (session.status === 'complete') throw conflict('This payment went through; its confirmation is on its way. Reload the order in a moment.')
      await tx.update(payments).set({ status: 'expired' }).where(eq(payments.id, open.id))
      attempt += 1
      await tx.update(milestones).set({ checkoutAttempt: attempt }).where(eq(milestones.id, milestoneId))
    }
    const parties = await partiesOf(tx, order.requestId)
    const base = ctx.config.siteUrl
    let session: Stripe.Checkout.Session
    try {
      session = await ctx.stripe.checkout.sessions.create({
        mode: 'payment',
        line_items: [{ quantity: 1, price_data: { currency: CURRENCY, unit_amount: milestone.amountCents, product_data: { name: `${milestone.title} · ${parties.title}`.slice(0, 250) } } }],
        success_url: `${base}/deals/orders/${order.id}/paid?milestone=${milestone.id}&session={CHECKOUT_SESSION_ID}`,
        cancel_url: `${base}/deals/orders/${order.id}?payment=cancelled`,
        client_reference_id: `milestone-${milestone.id}`,
        customer_email: parties.racerEmail,
        metadata: { milestone_id: String(milestone.id), order_id: String(order.id), attempt: String(attempt) },
        payment_intent_data: {
          metadata: { milestone_id: String(milestone.id), order_id: String(order.id) },
          transfer_group: `order-${order.id}`,
          description: `${parties.shopName}: ${milestone.title}`.slice(0, 250),
        },
      }, { idempotencyKey: checkoutKey(milestone.id, attempt) })
    }
    catch (e) {
      throw paymentServiceError('open a payment page', e)
    }
    if (!session.url) throw paymentServiceError('open a payment page', new Error('the session has no address'))
    const [known] = await tx.select({ id: payments.id }).from(payments).where(eq(payments.stripeCheckoutSessionId, session.id)).limit(1)
    if (!known) {
      await tx.insert(payments).values({
        milestoneId, kind: 'checkout', status: 'open', amountCents: milestone.amountCents, attempt, stripeCheckoutSessionId: session.id, checkoutUrl: session.url, createdAt: ctx.now(),
      })
    }
    return { url: session.url, sessionId: session.id, reused: !!known }
  })
}

export type WebhookOutcome = { duplicate: boolean, outcome: string }

/** Verifies a webhook's signature over the raw body; a bad or missing one is a 400 and changes nothing. */
export function verifyWebhook(stripe: Stripe, rawBody: string | Buffer | undefined, signature: string | undefined, secret: string): Stripe.Event {
  if (!secret) throw createError({ status: 503, message: 'Webhooks are not configured (set NUXT_STRIPE_WEBHOOK_SECRET).' })
  if (!rawBody || !signature) throw createError({ status: 400, message: 'A webhook needs its body and its Stripe-Signature header.' })
  try {
    return stripe.webhooks.constructEvent(rawBody, signature, secret)
  }
  catch (error) {
    throw createError({ status: 400, message: `The webhook signature does not verify: ${error instanceof Error ? error.message.split('\n')[0] : String(error)}` })
  }
}

/** Processes one verified event, exactly once: its id is written in the same transaction as what it changes. */
export async function processStripeEvent(ctx: DealContext, event: Stripe.Event): Promise<WebhookOutcome> {
  // Run again from the start after a lock conflict: the event's row rolls back with everything else,
  // and a refund made while handling it carries an idempotency key.
  return inRetriedTransaction(ctx.db, async (tx) => {
    try {
      await tx.insert(stripeEvents).values({ eventId: event.id, type: event.type, outcome: 'processing', processedAt: ctx.now() })
    }
    catch (error) {
      if (isDuplicateKey(error)) return { duplicate: true, outcome: 'already processed' }
      throw error
    }
    const outcome = (await dispatchEvent(ctx, tx, event)).slice(0, 500)
    await tx.update(stripeEvents).set({ outcome }).where(eq(stripeEvents.eventId, event.id))
    return { duplicate: false, outcome }
  })
}

function dispatchEvent(ctx: DealContext, tx: DbTransaction, event: Stripe.Event): Promise<string> {
  switch (event.type) {
    case 'checkout.session.completed': return onCheckoutCompleted(ctx, tx, event.data.object)
    case 'checkout.session.expired': return onCheckoutExpired(tx, event.data.object)
    case 'payment_intent.payment_failed': return onPaymentFailed(tx, event.data.object)
    case 'charge.refunded': return onChargeRefunded(ctx, tx, event.data.object)
    case 'transfer.created': return onTransferCreated(ctx, tx, event.data.object)
    default: return Promise.resolve(`ignored: the app does not use ${event.type}`)
  }
}

const idOf = (value: string | { id: string } | null | undefined) => (typeof value === 'string' ? value : value?.id ?? null)
const milestoneIdOf = (metadata: Stripe.Metadata | null | undefined) => {
  const n = Number(metadata?.milestone_id)
  return Number.isSafeInteger(n) && n > 0 ? n : null
}

async function onCheckoutCompleted(ctx: DealContext, tx: DbTransaction, session: Stripe.Checkout.Session): Promise<string> {
  if (session.payment_status !== 'paid') return `ignored: session ${session.id} is ${session.payment_status}`
  const [known] = await tx.select({ milestoneId: payments.milestoneId }).from(payments).where(eq(payments.stripeCheckoutSessionId, session.id)).limit(1)
  const milestoneId = known?.milestoneId ?? milestoneIdOf(session.metadata)
  if (!milestoneId) return `ignored: session ${session.id} is not a milestone payment`
  const [exists] = await tx.select({ id: milestones.id }).from(milestones).where(eq(milestones.id, milestoneId)).limit(1)
  if (!exists) return `ignored: no milestone ${milestoneId}`
  const { order, milestone } = await lockMilestone(tx, milestoneId)
  let [payment] = await tx.select().from(payments).where(eq(payments.stripeCheckoutSessionId, session.id)).limit(1).for('update')
  if (!payment) {
    // A session the app did not get to record (its transaction was lost after Stripe answered): record it now.
    await tx.insert(payments).values({
      milestoneId, kind: 'checkout', status: 'open', amountCents: session.amount_total ?? 0, attempt: Number(session.metadata?.attempt ?? 0) || 0,
      stripeCheckoutSessionId: session.id, checkoutUrl: session.url, createdAt: ctx.now(),
    })
    ;[payment] = await tx.select().from(payments).where(eq(payments.stripeCheckoutSessionId, session.id)).limit(1).for('update')
  }
  if (payment!.status === 'succeeded') return `already recorded: session ${session.id}`
  if (session.amount_total !== milestone.amountCents || session.currency !== CURRENCY) {
    await tx.update(payments).set({ status: 'failed', failureMessage: `Paid ${session.amount_total} ${session.currency}, expected ${milestone.amountCents} ${CURRENCY}` }).where(eq(payments.id, payment!.id))
    return `rejected: session ${session.id} paid ${session.amount_total} ${session.currency} for a milestone of ${milestone.amountCents}`
  }
  const piId = idOf(session.payment_intent)
  const pi = piId ? await ctx.stripe.paymentIntents.retrieve(piId) : null
  await tx.update(payments).set({ status: 'succeeded', stripePaymentIntentId: piId, stripeChargeId: idOf(pi?.latest_charge), failureMessage: null }).where(eq(payments.id, payment!.id))
  const now = ctx.now()
  if (milestone.state === 'awaiting_payment') {
    await tx.update(milestones).set({ state: 'funded', fundedAt: now }).where(eq(milestones.id, milestone.id))
    await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId: milestone.id, action: 'milestone_funded', detail: `Checkout ${session.id}, payment ${piId}` })
    await postEvent(tx, order.requestId, order.racerId, `The deposit for "${milestone.title}" was paid and is held until the milestone is approved.`, now)
    const parties = await partiesOf(tx, order.requestId)
    const link = `${ctx.config.siteUrl}/deals/orders/${order.id}`
    const mail = { kind: 'milestone_funded' as const, milestone: milestone.title, amountCents: milestone.amountCents, title: parties.title, link }
    await enqueueMail(tx, parties.racerEmail, { ...mail, recipientName: parties.racerName }, `funded:${milestone.id}:racer`)
    await enqueueMail(tx, parties.shopEmail, { ...mail, recipientName: parties.shopName }, `funded:${milestone.id}:builder`)
    return `milestone ${milestone.id} funded`
  }
  // Money arrived for a milestone that is cancelled, or already paid by another session: give it back.
  const why = milestone.state === 'cancelled' ? 'the order was cancelled before the payment completed' : `the milestone was already ${milestone.state}`
  if (!piId) return `rejected: session ${session.id} has no payment to refund`
  const refund = await ctx.stripe.refunds.create({ payment_intent: piId, reason: 'requested_by_customer', metadata: { milestone_id: String(milestone.id) } }, { idempotencyKey: `late-refund-${session.id}` })
  await tx.insert(payments).values({ milestoneId: milestone.id, kind: 'refund', status: 'succeeded', amountCents: refund.amount, stripePaymentIntentId: piId, stripeChargeId: idOf(pi?.latest_charge), stripeRefundId: refund.id, createdAt: now })
  await writeAudit(tx, { actorId: null, action: 'payment.refund', entityType: 'milestone', entityId: milestone.id, after: { refund: refund.id, amountCents: refund.amount }, note: why })
  await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId: milestone.id, action: 'payment_refunded', detail: `${refund.id}: ${why}` })
  const parties = await partiesOf(tx, order.requestId)
  await enqueueMail(tx, parties.racerEmail, {
    kind: 'milestone_refunded', recipientName: parties.racerName, milestone: milestone.title, amountCents: refund.amount,
    reason: `It was refunded because ${why}.`, link: `${ctx.config.siteUrl}/deals/orders/${order.id}`,
  }, `late-refund:${session.id}`)
  return `refunded session ${session.id}: ${why}`
}

async function onCheckoutExpired(tx: DbTransaction, session: Stripe.Checkout.Session): Promise<string> {
  const [known] = await tx.select({ milestoneId: payments.milestoneId }).from(payments).where(eq(payments.stripeCheckoutSessionId, session.id)).limit(1)
  if (!known) return `ignored: session ${session.id} is not one of ours`
  const { milestone } = await lockMilestone(tx, known.milestoneId)
  const [payment] = await tx.select().from(payments).where(eq(payments.stripeCheckoutSessionId, session.id)).limit(1).for('update')
  if (payment!.status !== 'open') return `ignored: session ${session.id} is already ${payment!.status}`
  await tx.update(payments).set({ status: 'expired' }).where(eq(payments.id, payment!.id))
  if (milestone.state === 'awaiting_payment' && milestone.checkoutAttempt <= payment!.attempt) {
    await tx.update(milestones).set({ checkoutAttempt: payment!.attempt + 1 }).where(eq(milestones.id, milestone.id))
  }
  return `session ${session.id} expired`
}

async function onPaymentFailed(tx: DbTransaction, pi: Stripe.PaymentIntent): Promise<string> {
  const milestoneId = milestoneIdOf(pi.metadata)
  if (!milestoneId) return `ignored: payment ${pi.id} is not a milestone payment`
  const [exists] = await tx.select({ id: milestones.id }).from(milestones).where(eq(milestones.id, milestoneId)).limit(1)
  if (!exists) return `ignored: no milestone ${milestoneId}`
  await lockMilestone(tx, milestoneId)
  const [payment] = await tx.select().from(payments)
    .where(and(eq(payments.milestoneId, milestoneId), eq(payments.kind, 'checkout'))).orderBy(desc(payments.attempt), desc(payments.id)).limit(1).for('update')
  if (!payment) return `ignored: no payment page for milestone ${milestoneId}`
  // Out of order: a decline that arrives after the payment went through changes nothing.
  if (payment.status !== 'open') return `ignored: the payment is already ${payment.status}`
  const message = pi.last_payment_error?.message ?? 'The card was declined.'
  await tx.update(payments).set({ failureMessage: message.slice(0, 500), stripePaymentIntentId: pi.id }).where(eq(payments.id, payment.id))
  return `recorded a declined attempt on milestone ${milestoneId}`
}

/**
 * A refund seen at the payment service. It touches only the rows of the payment it refunds: that
 * payment's Checkout row (recorded if the completion event has not come in yet) and one refund row
 * for its payment intent. The milestone follows the payment that funded it: it turns refunded only
 * when no other payment still holds its deposit (a late second payment refunded changes nothing).
 */
async function onChargeRefunded(ctx: DealContext, tx: DbTransaction, charge: Stripe.Charge): Promise<string> {
  const piId = idOf(charge.payment_intent)
  if (!piId) return `ignored: charge ${charge.id} has no payment intent`
  const [known] = await tx.select({ milestoneId: payments.milestoneId }).from(payments).where(and(eq(payments.stripePaymentIntentId, piId), eq(payments.kind, 'checkout'))).limit(1)
  let milestoneId = known?.milestoneId ?? null
  if (!milestoneId) {
    const pi = await ctx.stripe.paymentIntents.retrieve(piId)
    milestoneId = milestoneIdOf(pi.metadata)
  }
  if (!milestoneId) return `ignored: charge ${charge.id} is not a milestone payment`
  if (!charge.refunded) return `ignored: charge ${charge.id} is only partly refunded`
  const { order, milestone } = await lockMilestone(tx, milestoneId)
  // Read again under the lock (locking reads see what committed meanwhile, e.g. the app's own refund).
  const rows = await tx.select().from(payments).where(eq(payments.milestoneId, milestone.id)).orderBy(asc(payments.id)).for('update')
  const recorded = rows.filter(r => r.kind === 'refund' && r.stripePaymentIntentId === piId).reduce((a, r) => a + r.amountCents, 0)
  if (recorded >= charge.amount_refunded) {
    return milestone.state === 'refunded' ? `already refunded: milestone ${milestone.id}` : `already recorded: the refund of payment ${piId}`
  }
  const now = ctx.now()
  // This payment's own Checkout row: the one with its payment intent, else the open page it was paid
  // on (its completion event has not come in yet); never another payment's succeeded row.
  const checkout = rows.find(r => r.kind === 'checkout' && (r.stripePaymentIntentId === piId || r.stripeChargeId === charge.id))
    ?? rows.filter(r => r.kind === 'checkout' && r.status === 'open' && (r.stripePaymentIntentId === null || r.stripePaymentIntentId === piId)).sort((a, b) => b.attempt - a.attempt)[0]
  // A checkout already recorded as succeeded is left as it is: its updated_at stays the moment it was captured (the dashboard counts by it).
  if (checkout && (checkout.status !== 'succeeded' || checkout.stripeChargeId !== charge.id || checkout.stripePaymentIntentId !== piId)) {
    await tx.update(payments).set({ status: 'succeeded', stripePaymentIntentId: piId, stripeChargeId: charge.id }).where(eq(payments.id, checkout.id))
  }
  else if (!checkout) await tx.insert(payments).values({ milestoneId: milestone.id, kind: 'checkout', status: 'succeeded', amountCents: charge.amount, stripePaymentIntentId: piId, stripeChargeId: charge.id, createdAt: now })
  await tx.insert(payments).values({ milestoneId: milestone.id, kind: 'refund', status: 'succeeded', amountCents: charge.amount_refunded - recorded, stripePaymentIntentId: piId, stripeChargeId: charge.id, createdAt: now })
  const holding = await fundingPayment(tx, milestone.id)
  if (holding) {
    await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId: milestone.id, action: 'payment_refunded', detail: `charge ${charge.id} refunded at the payment service; the deposit stays held by payment ${holding.stripePaymentIntentId}` })
    return `recorded the refund of payment ${piId}; milestone ${milestone.id} stays ${milestone.state}, funded by ${holding.stripePaymentIntentId}`
  }
  if (!['awaiting_payment', 'funded', 'submitted', 'disputed'].includes(milestone.state)) {
    return `recorded the refund of payment ${piId}; milestone ${milestone.id} stays ${milestone.state}`
  }
  await tx.update(milestones).set({ state: 'refunded', refundedAt: now, fundedAt: milestone.fundedAt ?? now }).where(eq(milestones.id, milestone.id))
  await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId: milestone.id, action: 'milestone_refunded', detail: `charge ${charge.id} refunded at the payment service` })
  return `milestone ${milestone.id} refunded (refund made at the payment service)`
}

async function onTransferCreated(ctx: DealContext, tx: DbTransaction, transfer: Stripe.Transfer): Promise<string> {
  const [known] = await tx.select({ id: payments.id }).from(payments).where(eq(payments.stripeTransferId, transfer.id)).limit(1)
  if (known) return `already recorded: transfer ${transfer.id}`
  const milestoneId = milestoneIdOf(transfer.metadata)
  if (!milestoneId) return `ignored: transfer ${transfer.id} is not a milestone release`
  const { order, milestone } = await lockMilestone(tx, milestoneId)
  if (milestone.state !== 'approved') return `ignored: milestone ${milestone.id} is ${milestone.state}`
  // The release's own transaction was lost after the transfer was made: finish it from here.
  await markReleased(ctx, tx, order, milestone, transfer)
  return `milestone ${milestone.id} released (from the transfer event)`
}

/** The shop's connected account, created once (by idempotency key) the first time it is paid out. */
export async function ensurePayoutAccount(ctx: DealContext, tx: DbTransaction, shopId: number): Promise<string> {
  const [existing] = await tx.select().from(payoutAccounts).where(eq(payoutAccounts.shopId, shopId)).limit(1)
  if (existing) return existing.stripeAccountId
  const [shop] = await tx.select({ shopName: shops.shopName, email: users.email }).from(shops)
    .innerJoin(users, eq(users.id, shops.userId)).where(eq(shops.id, shopId)).limit(1)
  const account = await ctx.stripe.accounts.create({
    type: 'express', email: shop?.email, business_profile: { name: shop?.shopName }, metadata: { builder_id: String(shopId) },
  }, { idempotencyKey: `builder-${shopId}-payout-account` })
  await tx.insert(payoutAccounts).values({ shopId, stripeAccountId: account.id, createdAt: ctx.now() })
  return account.id
}

/** Transfers an approved milestone's amount less its fee to the shop, from the charge that funded it. */
export async function transferRelease(ctx: DealContext, tx: DbTransaction, order: Order, milestone: Milestone): Promise<Stripe.Transfer> {
  const funding = await fundingPayment(tx, milestone.id)
  if (!funding?.stripeChargeId) throw conflict('This milestone has no recorded payment to release from.')
  const destination = await ensurePayoutAccount(ctx, tx, order.shopId)
  return ctx.stripe.transfers.create({
    amount: milestone.amountCents - milestone.feeCents,
    currency: CURRENCY,
    destination,
    source_transaction: funding.stripeChargeId,
    transfer_group: `order-${order.id}`,
    description: `Release of "${milestone.title}"`.slice(0, 250),
    metadata: { milestone_id: String(milestone.id), order_id: String(order.id) },
  }, { idempotencyKey: `milestone-${milestone.id}-release` })
}

/** Records a release: the transfer row, the state, the shop's e-mail, and the order completed when nothing is left open. */
export async function markReleased(ctx: DealContext, tx: DbTransaction, order: Order, milestone: Milestone, transfer: Stripe.Transfer): Promise<void> {
  const now = ctx.now()
  const [known] = await tx.select({ id: payments.id }).from(payments).where(eq(payments.stripeTransferId, transfer.id)).limit(1)
  if (!known) {
    await tx.insert(payments).values({ milestoneId: milestone.id, kind: 'transfer', status: 'succeeded', amountCents: transfer.amount, stripeTransferId: transfer.id, createdAt: now })
  }
  await tx.update(milestones).set({ state: 'released', releasedAt: now }).where(eq(milestones.id, milestone.id))
  await writeAudit(tx, { actorId: null, action: 'milestone.release', entityType: 'milestone', entityId: milestone.id, before: { state: milestone.state }, after: { state: 'released', transfer: transfer.id, amountCents: transfer.amount } })
  await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId: milestone.id, action: 'milestone_released', detail: `transfer ${transfer.id}` })
  await postEvent(tx, order.requestId, null, `"${milestone.title}" was paid out to the shop.`, now)
  const parties = await partiesOf(tx, order.requestId)
  await enqueueMail(tx, parties.shopEmail, {
    kind: 'milestone_released', shopName: parties.shopName, milestone: milestone.title, payoutCents: transfer.amount, feeCents: milestone.feeCents,
    link: `${ctx.config.siteUrl}/deals/orders/${order.id}`,
  }, `released:${milestone.id}`)
  const rest = await tx.select({ state: milestones.state }).from(milestones).where(eq(milestones.orderId, order.id))
  if (order.status === 'active' && rest.every(m => m.state === 'released' || m.state === 'refunded' || m.state === 'cancelled')) {
    await tx.update(orders).set({ status: 'completed', completedAt: now }).where(eq(orders.id, order.id))
    await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, action: 'order_completed' })
  }
}

/**
 * Refunds a held milestone in full (by idempotency key, so a retry refunds nothing twice) and records it.
 * A caller that writes its own audit row and tells the parties itself (a settled dispute) passes
 * `{ audit: false, notify: false }`; the payment row, the state and the deal history are written either way.
 */
export async function refundHeld(
  ctx: DealContext, tx: DbTransaction, order: Order, milestone: Milestone, reason: string, actorId: number | null,
  opts: { audit?: boolean, notify?: boolean } = {},
): Promise<Stripe.Refund> {
  const funding = await fundingPayment(tx, milestone.id)
  if (!funding?.stripePaymentIntentId) throw conflict('This milestone has no recorded payment to refund.')
  let refund: Stripe.Refund
  try {
    refund = await ctx.stripe.refunds.create({
      payment_intent: funding.stripePaymentIntentId, reason: 'requested_by_customer', metadata: { milestone_id: String(milestone.id), order_id: String(order.id) },
    }, { idempotencyKey: `milestone-${milestone.id}-refund` })
  }
  catch (e) {
    throw paymentServiceError('refund the deposit', e)
  }
  const now = ctx.now()
  const [known] = await tx.select({ id: payments.id }).from(payments).where(eq(payments.stripeRefundId, refund.id)).limit(1)
  if (!known) {
    await tx.insert(payments).values({ milestoneId: milestone.id, kind: 'refund', status: 'succeeded', amountCents: refund.amount, stripePaymentIntentId: funding.stripePaymentIntentId, stripeRefundId: refund.id, createdAt: now })
  }
  await tx.update(milestones).set({ state: 'refunded', refundedAt: now }).where(eq(milestones.id, milestone.id))
  if (opts.audit !== false) {
    await writeAudit(tx, { actorId, action: 'milestone.refund', entityType: 'milestone', entityId: milestone.id, before: { state: milestone.state }, after: { state: 'refunded', refund: refund.id, amountCents: refund.amount }, note: reason })
  }
  await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId: milestone.id, actorId, action: 'milestone_refunded', detail: `${refund.id}: ${reason}` })
  if (opts.notify !== false) {
    await postEvent(tx, order.requestId, actorId, `The deposit for "${milestone.title}" was refunded: ${reason}`, now)
    const parties = await partiesOf(tx, order.requestId)
    const mail = { kind: 'milestone_refunded' as const, milestone: milestone.title, amountCents: refund.amount, reason: `Reason: ${reason}`, link: `${ctx.config.siteUrl}/deals/orders/${order.id}` }
    await enqueueMail(tx, parties.racerEmail, { ...mail, recipientName: parties.racerName }, `refunded:${milestone.id}:racer`)
    await enqueueMail(tx, parties.shopEmail, { ...mail, recipientName: parties.shopName }, `refunded:${milestone.id}:builder`)
  }
  return refund
}
