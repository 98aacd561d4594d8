// The object shapes the fake answers with: each a subset of the official SDK's type, so the
// compiler checks every field the fake sends against what `stripe` declares.
import { randomBytes } from 'node:crypto'
import type Stripe from 'stripe'

/** Kept beside a session (never sent): what its payment intent will carry once the payer pays. */
interface SessionExtras {
  _lineItems: FakeLineItem[]
  _paymentIntentData: { metadata: Record<string, string>, transfer_group: string | null, description: string | null }
}

export type FakeSession = SessionExtras & Pick<Stripe.Checkout.Session,
  'id' | 'object' | 'amount_subtotal' | 'amount_total' | 'cancel_url' | 'client_reference_id' | 'created' | 'currency'
  | 'customer' | 'customer_details' | 'customer_email' | 'expires_at' | 'livemode' | 'metadata' | 'mode' | 'payment_intent'
  | 'payment_method_types' | 'payment_status' | 'status' | 'success_url' | 'url'>

export interface FakeLineItem {
  name: string
  unitAmount: number
  quantity: number
  currency: string
}

export type FakePaymentIntent = Pick<Stripe.PaymentIntent,
  'id' | 'object' | 'amount' | 'amount_capturable' | 'amount_received' | 'canceled_at' | 'capture_method' | 'client_secret'
  | 'confirmation_method' | 'created' | 'currency' | 'customer' | 'description' | 'last_payment_error' | 'latest_charge'
  | 'livemode' | 'metadata' | 'payment_method' | 'payment_method_types' | 'receipt_email' | 'status' | 'transfer_group'>

export type FakeCharge = Pick<Stripe.Charge,
  'id' | 'object' | 'amount' | 'amount_captured' | 'amount_refunded' | 'balance_transaction' | 'captured' | 'created'
  | 'currency' | 'customer' | 'description' | 'disputed' | 'failure_code' | 'failure_message' | 'livemode' | 'metadata'
  | 'paid' | 'payment_intent' | 'payment_method' | 'receipt_email' | 'refunded' | 'status' | 'transfer_group'>

export type FakeRefund = Pick<Stripe.Refund,
  'id' | 'object' | 'amount' | 'balance_transaction' | 'charge' | 'created' | 'currency' | 'metadata' | 'payment_intent'
  | 'reason' | 'status'>

export type FakeTransfer = Pick<Stripe.Transfer,
  'id' | 'object' | 'amount' | 'amount_reversed' | 'balance_transaction' | 'created' | 'currency' | 'description'
  | 'destination' | 'livemode' | 'metadata' | 'reversed' | 'source_transaction' | 'transfer_group'>

export type FakeAccount = Pick<Stripe.Account,
  'id' | 'object' | 'business_profile' | 'charges_enabled' | 'country' | 'created' | 'default_currency' | 'details_submitted'
  | 'email' | 'metadata' | 'payouts_enabled' | 'type'>

export type FakeEvent = Pick<Stripe.Event, 'id' | 'object' | 'api_version' | 'created' | 'livemode' | 'pending_webhooks' | 'request'> & {
  type: FakeEventType
  data: { object: Record<string, unknown> }
}

/** The events the fake sends to its one webhook endpoint (an endpoint subscribed to these alone). */
export const FAKE_EVENT_TYPES = [
  'checkout.session.completed',
  'checkout.session.expired',
  'payment_intent.payment_failed',
  'charge.refunded',
  'transfer.created',
] as const satisfies readonly Stripe.Event.Type[]
export type FakeEventType = (typeof FAKE_EVENT_TYPES)[number]

/** An id in Stripe's style: a prefix, an underscore and random letters and digits. */
export function newId(prefix: string): string {
  const alphabet = 'abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789'
  const bytes = randomBytes(24)
  let tail = ''
  for (const b of bytes) tail += alphabet[b % alphabet.length]
  return `${prefix}_${tail}`
}

export const now = () => Math.floor(Date.now() / 1000)

/** What the API answers: the stored session without the fields kept for the fake's own use. */
export function publicSession(s: FakeSession): Omit<FakeSession, '_lineItems' | '_paymentIntentData'> {
  const { _lineItems: _items, _paymentIntentData: _data, ...rest } = s
  return rest
}
