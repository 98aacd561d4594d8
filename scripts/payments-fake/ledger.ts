// The fake's books: accounts, Checkout Sessions, payment intents, charges, refunds and transfers,
// in memory, with the checks the real API makes before it moves money.
import { ApiError, invalid, missing, noSuch } from './errors'
import type { FormObject } from './form'
import {
  type FakeAccount, type FakeCharge, type FakeEvent, type FakeEventType, type FakeLineItem, type FakePaymentIntent,
  type FakeRefund, type FakeSession, type FakeTransfer, newId, now, publicSession,
} from './objects'
import {
  allowOnly, currency, enumValue, metadata, optionalArray, optionalInteger, optionalObject, optionalString, requiredInteger, requiredString,
} from './params'

/** Test card numbers the hosted page knows; any other number is refused with a hint. */
type CardOutcome = { outcome: 'succeeds' } | { outcome: 'declined', code: string, declineCode: string, message: string }
export const TEST_CARDS = new Map<string, CardOutcome>([
  ['4242424242424242', { outcome: 'succeeds' }],
  ['4000000000000002', { outcome: 'declined', code: 'card_declined', declineCode: 'generic_decline', message: 'Your card was declined.' }],
  ['4000000000009995', { outcome: 'declined', code: 'card_declined', declineCode: 'insufficient_funds', message: 'Your card has insufficient funds.' }],
])

/** Smallest and largest amount one Checkout Session may charge, in cents (US dollars). */
export const AMOUNT_LIMITS = { min: 50, max: 99_999_999 } as const

const SESSION_LIFETIME_S = { min: 30 * 60, max: 24 * 60 * 60 }

export interface PayAttempt {
  cardNumber: string
  name: string
  email: string
}

export type PayResult
  = | { outcome: 'paid', redirect: string }
    | { outcome: 'declined', message: string }
    | { outcome: 'closed', message: string }

export const LEDGER_TABLES = ['accounts', 'sessions', 'paymentIntents', 'charges', 'refunds', 'transfers', 'events'] as const
export type LedgerTable = (typeof LEDGER_TABLES)[number]

export class Ledger {
  readonly accounts = new Map<string, FakeAccount>()
  readonly sessions = new Map<string, FakeSession>()
  readonly paymentIntents = new Map<string, FakePaymentIntent>()
  readonly charges = new Map<string, FakeCharge>()
  readonly refunds = new Map<string, FakeRefund>()
  readonly transfers = new Map<string, FakeTransfer>()
  readonly events = new Map<string, FakeEvent>()

  /** Everything the books hold, as plain JSON (for a demo that keeps its payments across restarts). */
  snapshot(): Record<LedgerTable, [string, unknown][]> {
    return Object.fromEntries(LEDGER_TABLES.map(t => [t, [...this[t].entries()]])) as Record<LedgerTable, [string, unknown][]>
  }

  restore(state: Partial<Record<LedgerTable, [string, unknown][]>>): void {
    for (const t of LEDGER_TABLES) {
      const map = this[t] as Map<string, unknown>
      map.clear()
      for (const [id, value] of state[t] ?? []) map.set(id, value)
    }
  }

  constructor(
    private readonly publicUrl: () => string,
    private readonly emit: (event: FakeEvent) => void,
    private readonly apiVersion: string,
  ) {}

  private event(type: FakeEventType, object: object, request: { id: string | null, idempotency_key: string | null } | null): FakeEvent {
    const event: FakeEvent = {
      id: newId('evt'),
      object: 'event',
      api_version: this.apiVersion,
      created: now(),
      data: { object: structuredClone(object) as Record<string, unknown> },
      livemode: false,
      pending_webhooks: 1,
      request,
      type,
    }
    this.events.set(event.id, event)
    this.emit(event)
    return event
  }

  // ── accounts ────────────────────────────────────────────────────────────
  createAccount(params: FormObject): FakeAccount {
    allowOnly(params, ['type', 'country', 'email', 'metadata', 'business_profile', 'capabilities', 'controller', 'default_currency'])
    const type = enumValue(params, 'type', ['express', 'custom', 'standard'] as const) ?? 'express'
    const profile = optionalObject(params, 'business_profile')
    if (profile) allowOnly(profile, ['name', 'url', 'product_description', 'mcc'], 'business_profile')
    const account: FakeAccount = {
      id: newId('acct'),
      object: 'account',
      business_profile: { name: profile ? optionalString(profile, 'name', 'business_profile') : null } as FakeAccount['business_profile'],
      charges_enabled: true,
      country: (optionalString(params, 'country') ?? 'US').toUpperCase(),
      created: now(),
      default_currency: currency(optionalString(params, 'default_currency') ?? 'usd', 'default_currency'),
      details_submitted: true,
      email: optionalString(params, 'email'),
      metadata: metadata(params),
      payouts_enabled: true,
      type,
    }
    this.accounts.set(account.id, account)
    return account
  }

  getAccount(id: string): FakeAccount {
    const account = this.accounts.get(id)
    if (!account) throw noSuch('account', id, 'account')
    return account
  }

  // ── Checkout Sessions ──────────────────────────────────────────────────
  createSession(params: FormObject): ReturnType<typeof publicSession> {
    allowOnly(params, ['mode', 'line_items', 'success_url', 'cancel_url', 'metadata', 'client_reference_id', 'customer_email', 'payment_intent_data', 'expires_at', 'payment_method_types', 'expand', 'currency'])
    const mode = requiredString(params, 'mode')
    if (mode !== 'payment') throw invalid('mode', `This fake takes mode=payment only, not '${mode}'.`)
    const successUrl = requiredString(params, 'success_url')
    const cancelUrl = optionalString(params, 'cancel_url')
    for (const [key, url] of [['success_url', successUrl], ['cancel_url', cancelUrl]] as const) {
      if (url !== null && !/^https?:\/\//.test(url)) throw invalid(key, `Not a valid URL: ${key} must start with http:// or https://.`, 'url_invalid')
    }
    const rawItems = optionalArray(params, 'line_items')
    if (!rawItems || rawItems.length === 0) throw missing('line_items')
    const items: FakeLineItem[] = rawItems.map((raw, i) => {
      const p = `line_items[${i}]`
      if (typeof raw === 'string' || Array.isArray(raw)) throw invalid(p, `Invalid object: ${p} must be a hash.`, 'parameter_invalid_object')
      allowOnly(raw, ['price_data', 'quantity', 'price'], p)
      if (raw.price !== undefined) throw noSuch('price', String(raw.price), `${p}[price]`)
      const data = optionalObject(raw, 'price_data', p)
      if (!data) throw missing(`${p}[price_data]`)
      allowOnly(data, ['currency', 'unit_amount', 'product_data'], `${p}[price_data]`)
      const product = optionalObject(data, 'product_data', `${p}[price_data]`)
      if (!product) throw missing(`${p}[price_data][product_data]`)
      allowOnly(product, ['name', 'description', 'metadata'], `${p}[price_data][product_data]`)
      const unitAmount = requiredInteger(data, 'unit_amount', `${p}[price_data]`)
      if (unitAmount < 0) throw invalid(`${p}[price_data][unit_amount]`, 'This value must be greater than or equal to 0.', 'parameter_invalid_integer')
      const quantity = optionalInteger(raw, 'quantity', p) ?? 1
      if (quantity < 1) throw invalid(`${p}[quantity]`, 'This value must be greater than or equal to 1.', 'parameter_invalid_integer')
      return {
        name: requiredString(product, 'name', `${p}[price_data][product_data]`),
        unitAmount,
        quantity,
        currency: currency(requiredString(data, 'currency', `${p}[price_data]`), `${p}[price_data][currency]`),
      }
    })
    const sessionCurrency = items[0]!.currency
    if (items.some(i => i.currency !== sessionCurrency)) throw invalid('line_items', 'Every line item must use the same currency.')
    const total = items.reduce((sum, i) => sum + i.unitAmount * i.quantity, 0)
    if (total < AMOUNT_LIMITS.min) {
      throw new ApiError(400, 'invalid_request_error', `The Checkout Session's total amount must be at least ${AMOUNT_LIMITS.min} cents.`, { code: 'amount_too_small', param: 'line_items' })
    }
    if (total > AMOUNT_LIMITS.max) {
      throw new ApiError(400, 'invalid_request_error', `The Checkout Session's total amount must be at most ${AMOUNT_LIMITS.max} cents.`, { code: 'amount_too_large', param: 'line_items' })
    }
    const created = now()
    const expiresAt = optionalInteger(params, 'expires_at') ?? created + SESSION_LIFETIME_S.max
    if (expiresAt < created + SESSION_LIFETIME_S.min || expiresAt > created + SESSION_LIFETIME_S.max) {
      throw invalid('expires_at', 'expires_at must be between 30 minutes and 24 hours from now.', 'parameter_invalid_integer')
    }
    const pid = optionalObject(params, 'payment_intent_data')
    if (pid) allowOnly(pid, ['metadata', 'transfer_group', 'description'], 'payment_intent_data')
    const id = newId('cs_test')
    const session: FakeSession = {
      id,
      object: 'checkout.session',
      amount_subtotal: total,
      amount_total: total,
      cancel_url: cancelUrl,
      client_reference_id: optionalString(params, 'client_reference_id'),
      created,
      currency: sessionCurrency,
      customer: null,
      customer_details: null,
      customer_email: optionalString(params, 'customer_email'),
      expires_at: expiresAt,
      livemode: false,
      metadata: metadata(params),
      mode: 'payment',
      payment_intent: null,
      payment_method_types: ['card'],
      payment_status: 'unpaid',
      status: 'open',
      success_url: successUrl,
      url: `${this.publicUrl()}/pay/${id}`,
      _lineItems: items,
      _paymentIntentData: {
        metadata: pid ? metadata(pid, 'metadata', 'payment_intent_data') : {},
        transfer_group: pid ? optionalString(pid, 'transfer_group', 'payment_intent_data') : null,
        description: pid ? optionalString(pid, 'description', 'payment_intent_data') : null,
      },
    }
    this.sessions.set(id, session)
    return this.sessionView(session, expandOf(params))
  }

  /** The stored session, expired first when its time has run out (the real API expires them on its own). */
  session(id: string): FakeSession {
    const session = this.sessions.get(id)
    if (!session) throw noSuch('checkout.session', id)
    if (session.status === 'open' && session.expires_at <= now()) this.expire(session, null)
    return session
  }

  sessionView(session: FakeSession, expand: string[]): ReturnType<typeof publicSession> {
    const view = publicSession(session)
    if (expand.includes('payment_intent') && typeof session.payment_intent === 'string') {
      return { ...view, payment_intent: this.paymentIntents.get(session.payment_intent) as never }
    }
    return view
  }

  getSession(id: string, params: FormObject) {
    return this.sessionView(this.session(id), expandOf(params))
  }

  expireSession(id: string, request: { id: string, idempotency_key: string | null }) {
    const session = this.session(id)
    if (session.status !== 'open') {
      throw new ApiError(400, 'invalid_request_error', `Only Checkout Sessions with status "open" can be expired; this one is "${session.status}".`, { code: 'checkout_session_not_open' })
    }
    this.expire(session, request)
    return publicSession(session)
  }

  private expire(session: FakeSession, request: { id: string, idempotency_key: string | null } | null) {
    session.status = 'expired'
    this.event('checkout.session.expired', publicSession(session), request)
  }

  // ── the hosted page's payment ──────────────────────────────────────────
  /** What happens when the payer submits the hosted page: succeed, decline, or refuse a closed session. */
  pay(sessionId: string, attempt: PayAttempt): PayResult {
    const session = this.session(sessionId)
    if (session.status === 'complete') return { outcome: 'closed', message: 'This payment is already complete.' }
    if (session.status !== 'open') return { outcome: 'closed', message: 'This payment page has expired. Go back and start the payment again.' }
    const card = TEST_CARDS.get(attempt.cardNumber)
    if (!card) throw new Error('unknown card') // the page checks the number before it calls pay()
    const pi = this.intentFor(session, attempt.email)
    if (card.outcome === 'declined') {
      pi.status = 'requires_payment_method'
      pi.last_payment_error = { type: 'card_error', code: card.code, decline_code: card.declineCode, message: card.message } as FakePaymentIntent['last_payment_error']
      this.event('payment_intent.payment_failed', pi, null)
      return { outcome: 'declined', message: card.message }
    }
    const charge: FakeCharge = {
      id: newId('ch'),
      object: 'charge',
      amount: pi.amount,
      amount_captured: pi.amount,
      amount_refunded: 0,
      balance_transaction: newId('txn'),
      captured: true,
      created: now(),
      currency: pi.currency,
      customer: null,
      description: pi.description,
      disputed: false,
      failure_code: null,
      failure_message: null,
      livemode: false,
      metadata: {},
      paid: true,
      payment_intent: pi.id,
      payment_method: typeof pi.payment_method === 'string' ? pi.payment_method : null,
      receipt_email: attempt.email || null,
      refunded: false,
      status: 'succeeded',
      transfer_group: pi.transfer_group,
    }
    this.charges.set(charge.id, charge)
    Object.assign(pi, { status: 'succeeded', amount_received: pi.amount, latest_charge: charge.id, last_payment_error: null })
    session.status = 'complete'
    session.payment_status = 'paid'
    session.customer_details = { email: attempt.email || null, name: attempt.name || null } as FakeSession['customer_details']
    this.event('checkout.session.completed', publicSession(session), null)
    const redirect = (session.success_url ?? this.publicUrl()).replaceAll('{CHECKOUT_SESSION_ID}', session.id)
    return { outcome: 'paid', redirect }
  }

  private intentFor(session: FakeSession, email: string): FakePaymentIntent {
    if (typeof session.payment_intent === 'string') return this.paymentIntents.get(session.payment_intent)!
    const data = session._paymentIntentData
    const id = newId('pi')
    const pi: FakePaymentIntent = {
      id,
      object: 'payment_intent',
      amount: session.amount_total ?? 0,
      amount_capturable: 0,
      amount_received: 0,
      canceled_at: null,
      capture_method: 'automatic',
      client_secret: `${id}_secret_${newId('s').slice(2, 14)}`,
      confirmation_method: 'automatic',
      created: now(),
      currency: session.currency ?? 'usd',
      customer: null,
      description: data.description,
      last_payment_error: null,
      latest_charge: null,
      livemode: false,
      metadata: { ...data.metadata },
      payment_method: newId('pm'),
      payment_method_types: ['card'],
      receipt_email: email || null,
      status: 'requires_payment_method',
      transfer_group: data.transfer_group,
    }
    this.paymentIntents.set(id, pi)
    session.payment_intent = id
    return pi
  }

  getPaymentIntent(id: string, params: FormObject) {
    const pi = this.paymentIntents.get(id)
    if (!pi) throw noSuch('payment_intent', id, 'intent')
    if (expandOf(params).includes('latest_charge') && typeof pi.latest_charge === 'string') {
      return { ...pi, latest_charge: this.charges.get(pi.latest_charge) as never }
    }
    return pi
  }

  // ── money out ───────────────────────────────────────────────────────────
  /** What is left on a charge to refund or transfer: the amount less refunds and transfers funded from it. */
  unspent(charge: FakeCharge): number {
    let transferred = 0
    for (const t of this.transfers.values()) if (t.source_transaction === charge.id) transferred += t.amount - t.amount_reversed
    return charge.amount - charge.amount_refunded - transferred
  }

  createRefund(params: FormObject, request: { id: string, idempotency_key: string | null }): FakeRefund {
    allowOnly(params, ['payment_intent', 'charge', 'amount', 'reason', 'metadata', 'expand'])
    const piId = optionalString(params, 'payment_intent')
    const chargeId = optionalString(params, 'charge')
    if (!piId && !chargeId) throw missing('payment_intent')
    let charge: FakeCharge | undefined
    if (piId) {
      const pi = this.paymentIntents.get(piId)
      if (!pi) throw noSuch('payment_intent', piId, 'payment_intent')
      if (pi.status !== 'succeeded' || typeof pi.latest_charge !== 'string') {
        throw new ApiError(400, 'invalid_request_error', `This PaymentIntent (${piId}) does not have a successful charge to refund.`, { code: 'charge_not_refundable', param: 'payment_intent' })
      }
      charge = this.charges.get(pi.latest_charge)
    }
    else {
      charge = this.charges.get(chargeId!)
      if (!charge) throw noSuch('charge', chargeId!, 'charge')
    }
    if (!charge) throw new ApiError(500, 'api_error', 'The charge behind this payment intent is missing.')
    const remaining = charge.amount - charge.amount_refunded
    if (remaining === 0) {
      throw new ApiError(400, 'invalid_request_error', `Charge ${charge.id} has already been refunded.`, { code: 'charge_already_refunded', param: 'charge' })
    }
    const amount = optionalInteger(params, 'amount') ?? remaining
    if (amount < 1) throw invalid('amount', 'The refund amount must be a positive integer.', 'parameter_invalid_integer')
    if (amount > remaining) {
      throw new ApiError(400, 'invalid_request_error', `Refund amount (${amount}) is greater than the unrefunded amount on the charge (${remaining}).`, { code: 'amount_too_large', param: 'amount' })
    }
    if (amount > this.unspent(charge)) {
      throw new ApiError(400, 'invalid_request_error', `Insufficient funds: ${amount} cannot be refunded because ${charge.amount - this.unspent(charge) - charge.amount_refunded} of this charge has been transferred to a connected account.`, { code: 'balance_insufficient', param: 'amount' })
    }
    const refund: FakeRefund = {
      id: newId('re'),
      object: 'refund',
      amount,
      balance_transaction: newId('txn'),
      charge: charge.id,
      created: now(),
      currency: charge.currency,
      metadata: metadata(params),
      payment_intent: charge.payment_intent,
      reason: enumValue(params, 'reason', ['duplicate', 'fraudulent', 'requested_by_customer'] as const),
      status: 'succeeded',
    }
    this.refunds.set(refund.id, refund)
    charge.amount_refunded += amount
    charge.refunded = charge.amount_refunded === charge.amount
    this.event('charge.refunded', charge, request)
    return refund
  }

  createTransfer(params: FormObject, request: { id: string, idempotency_key: string | null }): FakeTransfer {
    allowOnly(params, ['amount', 'currency', 'destination', 'source_transaction', 'transfer_group', 'metadata', 'description', 'expand'])
    const amount = requiredInteger(params, 'amount')
    if (amount < 1) throw invalid('amount', 'The transfer amount must be a positive integer.', 'parameter_invalid_integer')
    const cur = currency(requiredString(params, 'currency'), 'currency')
    const destination = requiredString(params, 'destination')
    if (!this.accounts.has(destination)) throw new ApiError(400, 'invalid_request_error', `No such destination: '${destination}'`, { code: 'resource_missing', param: 'destination' })
    const source = optionalString(params, 'source_transaction')
    if (source) {
      const charge = this.charges.get(source)
      if (!charge) throw noSuch('charge', source, 'source_transaction')
      if (charge.currency !== cur) throw invalid('currency', `The transfer currency (${cur}) must match the source charge's (${charge.currency}).`)
      if (amount > this.unspent(charge)) {
        throw new ApiError(400, 'invalid_request_error', `Insufficient funds: the transfer (${amount}) is more than is left on charge ${charge.id} (${this.unspent(charge)}).`, { code: 'balance_insufficient', param: 'amount' })
      }
    }
    else if (amount > this.balance(cur)) {
      throw new ApiError(400, 'invalid_request_error', `Insufficient funds in the platform balance (${this.balance(cur)} ${cur}) for a transfer of ${amount}.`, { code: 'balance_insufficient', param: 'amount' })
    }
    const transfer: FakeTransfer = {
      id: newId('tr'),
      object: 'transfer',
      amount,
      amount_reversed: 0,
      balance_transaction: newId('txn'),
      created: now(),
      currency: cur,
      description: optionalString(params, 'description'),
      destination,
      livemode: false,
      metadata: metadata(params),
      reversed: false,
      source_transaction: source,
      transfer_group: optionalString(params, 'transfer_group'),
    }
    this.transfers.set(transfer.id, transfer)
    this.event('transfer.created', transfer, request)
    return transfer
  }

  /** The platform's balance in one currency: charges less refunds less transfers. */
  balance(cur: string): number {
    let total = 0
    for (const c of this.charges.values()) if (c.currency === cur && c.paid) total += c.amount - c.amount_refunded
    for (const t of this.transfers.values()) if (t.currency === cur) total -= t.amount - t.amount_reversed
    return total
  }

  get<T>(map: Map<string, T>, what: string, id: string): T {
    const found = map.get(id)
    if (!found) throw noSuch(what, id)
    return found
  }
}

function expandOf(params: FormObject): string[] {
  const raw = params.expand
  return Array.isArray(raw) ? raw.filter((v): v is string => typeof v === 'string') : []
}
