// The payments fake through the official `stripe` SDK (23.1.0): wire format, idempotency, errors,
// the hosted page and signed webhooks. Each test file run gets its own fake with its own webhook
// receiver, so deliveries can be counted; the app's fake is the one in tests/support/global-setup.ts.
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Stripe from 'stripe'
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest'
import { createPaymentsFake, type PaymentsFake } from '../../scripts/payments-fake/server'
import { CARDS, eventually, payOnFakePage, stripeClient, webhookReceiver } from '../support/payments'

const KEY = 'sk_test_fake_suite_0123456789'
const SECRET = 'whsec_fake_suite_abcdef'
let fake: PaymentsFake
let receiver: Awaited<ReturnType<typeof webhookReceiver>>
let stripe: Stripe

beforeAll(async () => {
  receiver = await webhookReceiver()
  fake = await createPaymentsFake({ port: 0, secretKey: KEY, webhookSecret: SECRET, webhookUrl: receiver.url, retryDelaysMs: [50, 100, 200] })
  stripe = stripeClient(fake.port, KEY)
})
afterAll(async () => {
  await fake.close()
  await receiver.close()
})
afterEach(() => {
  receiver.received.length = 0
})

const sessionParams = (amount = 250_000, extra: Partial<Stripe.Checkout.SessionCreateParams> = {}): Stripe.Checkout.SessionCreateParams => ({
  mode: 'payment',
  success_url: 'http://127.0.0.1:9/orders/1/paid?session={CHECKOUT_SESSION_ID}',
  cancel_url: 'http://127.0.0.1:9/orders/1',
  line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount: amount, product_data: { name: 'Deposit: machine work' } } }],
  metadata: { milestone_id: '41', order_id: '7' },
  payment_intent_data: { metadata: { milestone_id: '41', order_id: '7' }, transfer_group: 'order-7' },
  ...extra,
})

const eventsOf = (type: string) => receiver.received.filter(r => r.event.type === type)

describe('authentication', () => {
  it('answers 401 (StripeAuthenticationError) without a key or with the wrong key', async () => {
    const res = await fetch(`${fake.url}/v1/accounts`, { method: 'POST' })
    expect(res.status).toBe(401)
    expect((await res.json()).error.type).toBe('invalid_request_error')
    await expect(stripeClient(fake.port, 'sk_test_wrong_key_000000').accounts.create({ type: 'express' }))
      .rejects.toBeInstanceOf(Stripe.errors.StripeAuthenticationError)
  })
})

describe('Checkout Sessions', () => {
  it('creates an open session whose url is the fake\'s own page, with the form-encoded metadata intact', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    expect(session.id).toMatch(/^cs_test_/)
    expect(session.object).toBe('checkout.session')
    expect(session.status).toBe('open')
    expect(session.payment_status).toBe('unpaid')
    expect(session.amount_total).toBe(250_000)
    expect(session.currency).toBe('usd')
    expect(session.metadata).toEqual({ milestone_id: '41', order_id: '7' })
    expect(session.url).toBe(`${fake.url}/pay/${session.id}`)
    const again = await stripe.checkout.sessions.retrieve(session.id)
    expect(again.id).toBe(session.id)
    expect(again.status).toBe('open')
  })

  it('replays the same response for the same idempotency key and body, marked Idempotent-Replayed', async () => {
    const first = await stripe.checkout.sessions.create(sessionParams(), { idempotencyKey: 'milestone-41-attempt-0' })
    const second = await stripe.checkout.sessions.create(sessionParams(), { idempotencyKey: 'milestone-41-attempt-0' })
    expect(second.id).toBe(first.id)
    expect(second.lastResponse.headers['idempotent-replayed']).toBe('true')
    expect(fake.ledger.sessions.has(first.id)).toBe(true)
    expect([...fake.ledger.sessions.values()].filter(s => s.id === first.id)).toHaveLength(1)
  })

  it('refuses the same idempotency key with a different body (400 StripeIdempotencyError)', async () => {
    await stripe.checkout.sessions.create(sessionParams(), { idempotencyKey: 'milestone-42-attempt-0' })
    const error = await stripe.checkout.sessions.create(sessionParams(9_999), { idempotencyKey: 'milestone-42-attempt-0' }).catch(e => e)
    expect(error).toBeInstanceOf(Stripe.errors.StripeIdempotencyError)
    expect(error.statusCode).toBe(400)
    expect(error.type).toBe('StripeIdempotencyError')
  })

  it.each([
    ['a missing success_url', { success_url: undefined }, 'parameter_missing', 'success_url'],
    ['an unknown parameter', { submit_type: 'pay' }, 'parameter_unknown', 'submit_type'],
    ['a total under 50 cents', { line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount: 49, product_data: { name: 'x' } } }] }, 'amount_too_small', 'line_items'],
    ['a non-integer amount', { line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount_decimal: '10.5', product_data: { name: 'x' } } }] } as never, 'parameter_unknown', 'line_items[0][price_data][unit_amount_decimal]'],
  ])('answers 400 (StripeInvalidRequestError) naming the parameter for %s', async (_what, change, code, param) => {
    const error = await stripe.checkout.sessions.create({ ...sessionParams(), ...change }).catch(e => e)
    expect(error).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(error.statusCode).toBe(400)
    expect(error.code).toBe(code)
    expect(error.param).toBe(param)
  })

  it('answers 404 resource_missing for an unknown session and for a route the fake does not serve', async () => {
    const error = await stripe.checkout.sessions.retrieve('cs_test_nothing').catch(e => e)
    expect(error).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(error.statusCode).toBe(404)
    expect(error.code).toBe('resource_missing')
    const unknown = await fetch(`${fake.url}/v1/customers`, { method: 'POST', headers: { authorization: `Bearer ${KEY}` } })
    expect(unknown.status).toBe(404)
    expect((await unknown.json()).error.message).toContain('Unrecognized request URL')
  })

  it('expires an open session (and sends checkout.session.expired), but not a second time', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const expired = await stripe.checkout.sessions.expire(session.id)
    expect(expired.status).toBe('expired')
    await expect(stripe.checkout.sessions.expire(session.id)).rejects.toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    await eventually('the expired event', () => eventsOf('checkout.session.expired').find(r => (r.event.data.object as { id: string }).id === session.id))
    const page = await fetch(session.url!)
    expect(await page.text()).toContain('This payment is expired')
  })
})

describe('the hosted payment page', () => {
  it('shows the amount and the test cards', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams(123_456))
    const res = await fetch(session.url!)
    expect(res.status).toBe(200)
    const html = await res.text()
    expect(html).toContain('$1,234.56')
    expect(html).toContain('Deposit: machine work')
    expect(html).toContain('4242 4242 4242 4242')
  })

  it('declines 4000 0000 0000 0002 with a message, sends payment_intent.payment_failed, and keeps the session open', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const page = await payOnFakePage(session.url!, CARDS.declined)
    expect(page.status).toBe(402)
    expect(page.html).toContain('Your card was declined.')
    const failed = await eventually('the failure event', () => eventsOf('payment_intent.payment_failed')[0])
    const pi = failed.event.data.object as unknown as Stripe.PaymentIntent
    expect(pi.status).toBe('requires_payment_method')
    expect(pi.last_payment_error?.decline_code).toBe('generic_decline')
    expect(pi.metadata).toEqual({ milestone_id: '41', order_id: '7' })
    expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe('open')
  })

  it('refuses an invalid card number or a past expiry on the page, sending nothing', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const bad = await payOnFakePage(session.url!, '4242 4242 4242 4241')
    expect(bad.status).toBe(400)
    expect(bad.html).toContain('card number is incomplete or invalid')
    const past = await payOnFakePage(session.url!, CARDS.succeeds, { expiry: '01/20' })
    expect(past.html).toContain('expiry date is in the past')
    const other = await payOnFakePage(session.url!, '5555 5555 5555 4444')
    expect(other.html).toContain('only the test cards')
    await new Promise(r => setTimeout(r, 200))
    expect(receiver.received).toEqual([])
  })

  it('takes 4242 4242 4242 4242, redirects to success_url and sends a checkout.session.completed the SDK verifies', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    const page = await payOnFakePage(session.url!, CARDS.succeeds)
    expect(page.status).toBe(303)
    expect(page.location).toBe(`http://127.0.0.1:9/orders/1/paid?session=${session.id}`)
    const hook = await eventually('the completed event', () => eventsOf('checkout.session.completed')[0])
    // Signed over the raw bytes with the SDK's scheme: constructEvent accepts it and rejects any change.
    const event = stripe.webhooks.constructEvent(hook.raw, hook.signature, SECRET)
    expect(event.type).toBe('checkout.session.completed')
    expect(hook.raw).toContain('\n  "id"')
    expect(() => stripe.webhooks.constructEvent(hook.raw.replace('"paid"', '"unpaid"'), hook.signature, SECRET)).toThrow(Stripe.errors.StripeSignatureVerificationError)
    expect(() => stripe.webhooks.constructEvent(hook.raw, hook.signature, 'whsec_other')).toThrow(Stripe.errors.StripeSignatureVerificationError)
    const completed = event.data.object as Stripe.Checkout.Session
    expect(completed.payment_status).toBe('paid')
    const paid = await stripe.checkout.sessions.retrieve(session.id, { expand: ['payment_intent'] })
    expect(paid.status).toBe('complete')
    const pi = paid.payment_intent as Stripe.PaymentIntent
    expect(pi.status).toBe('succeeded')
    expect(pi.amount_received).toBe(250_000)
    expect(pi.transfer_group).toBe('order-7')
    expect((await stripe.paymentIntents.retrieve(pi.id)).latest_charge).toMatch(/^ch_/)
    const again = await payOnFakePage(session.url!, CARDS.succeeds)
    expect(again.html).toContain('already complete')
  })
})

/** A paid session's payment intent and charge. */
async function paid(amount: number) {
  const session = await stripe.checkout.sessions.create(sessionParams(amount))
  await payOnFakePage(session.url!, CARDS.succeeds)
  const pi = await stripe.paymentIntents.retrieve((await stripe.checkout.sessions.retrieve(session.id)).payment_intent as string)
  return { pi, charge: pi.latest_charge as string }
}

describe('refunds and transfers', () => {
  it('refunds a payment intent in full, sends charge.refunded, and refuses a second refund', async () => {
    const { pi } = await paid(80_000)
    const refund = await stripe.refunds.create({ payment_intent: pi.id, reason: 'requested_by_customer' }, { idempotencyKey: 'refund-a' })
    expect(refund.object).toBe('refund')
    expect(refund.amount).toBe(80_000)
    expect(refund.status).toBe('succeeded')
    const hook = await eventually('charge.refunded', () => eventsOf('charge.refunded')[0])
    expect((hook.event.data.object as unknown as Stripe.Charge).refunded).toBe(true)
    const again = await stripe.refunds.create({ payment_intent: pi.id }).catch(e => e)
    expect(again).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(again.code).toBe('charge_already_refunded')
  })

  it('refuses a refund larger than what is left, and a refund of an unpaid intent', async () => {
    const { pi } = await paid(10_000)
    await stripe.refunds.create({ payment_intent: pi.id, amount: 4_000 })
    const tooLarge = await stripe.refunds.create({ payment_intent: pi.id, amount: 6_001 }).catch(e => e)
    expect(tooLarge.code).toBe('amount_too_large')
    expect(tooLarge.param).toBe('amount')
    const missing = await stripe.refunds.create({ payment_intent: 'pi_unknown' }).catch(e => e)
    expect(missing.statusCode).toBe(404)
  })

  it('creates a connected account and transfers to it from a charge, never more than is left on it', async () => {
    const account = await stripe.accounts.create({ type: 'express', email: 'shop@shop.test', business_profile: { name: 'Invented Shop' }, metadata: { builder_id: '3' } })
    expect(account.id).toMatch(/^acct_/)
    expect(account.payouts_enabled).toBe(true)
    const { pi, charge } = await paid(50_000)
    const transfer = await stripe.transfers.create({ amount: 47_500, currency: 'usd', destination: account.id, source_transaction: charge, transfer_group: 'order-7', metadata: { milestone_id: '41' } })
    expect(transfer.object).toBe('transfer')
    expect(transfer.amount).toBe(47_500)
    expect(transfer.destination).toBe(account.id)
    await eventually('transfer.created', () => eventsOf('transfer.created')[0])
    const second = await stripe.transfers.create({ amount: 2_501, currency: 'usd', destination: account.id, source_transaction: charge }).catch(e => e)
    expect(second.code).toBe('balance_insufficient')
    // What was transferred can no longer be refunded from the platform.
    const refund = await stripe.refunds.create({ payment_intent: pi.id }).catch(e => e)
    expect(refund.code).toBe('balance_insufficient')
    const nowhere = await stripe.transfers.create({ amount: 100, currency: 'usd', destination: 'acct_nobody' }).catch(e => e)
    expect(nowhere.statusCode).toBe(400)
    expect(nowhere.param).toBe('destination')
  })
})

describe('webhook delivery', () => {
  it('retries a delivery the endpoint refuses, until it is taken', async () => {
    const flaky = await webhookReceiver([500, 503])
    const local = await createPaymentsFake({ port: 0, secretKey: KEY, webhookSecret: SECRET, webhookUrl: flaky.url, retryDelaysMs: [20, 40, 80] })
    try {
      const client = stripeClient(local.port, KEY)
      const session = await client.checkout.sessions.create(sessionParams())
      await payOnFakePage(session.url!, CARDS.succeeds)
      await eventually('three deliveries', () => flaky.received.length >= 3 && local.webhooks.idle())
      expect(flaky.received.map(r => r.event.id)).toEqual(Array(3).fill(flaky.received[0]!.event.id))
      expect(local.webhooks.deliveries[0]).toMatchObject({ attempts: 3, delivered: true, lastStatus: 200 })
    }
    finally {
      await local.close()
      await flaky.close()
    }
  })

  it('keeps retrying while the endpoint is down and gives up after the last wait', async () => {
    const local = await createPaymentsFake({ port: 0, secretKey: KEY, webhookSecret: SECRET, webhookUrl: 'http://127.0.0.1:9/hook', retryDelaysMs: [10, 10] })
    try {
      const client = stripeClient(local.port, KEY)
      const session = await client.checkout.sessions.create(sessionParams())
      await payOnFakePage(session.url!, CARDS.succeeds)
      const delivery = await eventually('the last attempt', () => (local.webhooks.idle() && local.webhooks.deliveries[0]?.attempts === 3 ? local.webhooks.deliveries[0] : undefined))
      expect(delivery.delivered).toBe(false)
      expect(delivery.lastError).toBeTruthy()
    }
    finally {
      await local.close()
    }
  })

  it('re-sends an event on request (a duplicate with the same id), for replay tests', async () => {
    const session = await stripe.checkout.sessions.create(sessionParams())
    await payOnFakePage(session.url!, CARDS.succeeds)
    const first = await eventually('the completed event', () => eventsOf('checkout.session.completed')[0])
    const res = await fetch(`${fake.url}/_fake/events/${first.event.id}/resend`, { method: 'POST' })
    expect(res.status).toBe(202)
    const both = await eventually('the duplicate', () => (eventsOf('checkout.session.completed').length === 2 ? eventsOf('checkout.session.completed') : undefined))
    expect(both[1]!.event.id).toBe(first.event.id)
  })

  it('keeps its books in a state file across a restart (the demo\'s), so a payment made before can be paid out after', async () => {
    const stateFile = join(mkdtempSync(join(tmpdir(), 'tw-fake-')), 'state.json')
    const first = await createPaymentsFake({ port: 0, secretKey: KEY, webhookSecret: SECRET, webhookUrl: null, stateFile })
    const before = stripeClient(first.port, KEY)
    const session = await before.checkout.sessions.create(sessionParams(40_000), { idempotencyKey: 'restart-check' })
    await payOnFakePage(session.url!, CARDS.succeeds)
    const account = await before.accounts.create({ type: 'express' })
    await first.close()
    const second = await createPaymentsFake({ port: 0, secretKey: KEY, webhookSecret: SECRET, webhookUrl: null, stateFile })
    try {
      const after = stripeClient(second.port, KEY)
      const paid = await after.checkout.sessions.retrieve(session.id, { expand: ['payment_intent'] })
      expect(paid.status).toBe('complete')
      const charge = (paid.payment_intent as Stripe.PaymentIntent).latest_charge as string
      const transfer = await after.transfers.create({ amount: 38_000, currency: 'usd', destination: account.id, source_transaction: charge })
      expect(transfer.amount).toBe(38_000)
      const replay = await after.checkout.sessions.create(sessionParams(40_000), { idempotencyKey: 'restart-check' })
      expect(replay.id).toBe(session.id)
    }
    finally {
      await second.close()
    }
  })
})
