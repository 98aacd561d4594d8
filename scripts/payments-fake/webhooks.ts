// Signed webhook delivery with retries. The signature is the scheme the SDK verifies
// (`stripe.webhooks.constructEvent`): header `t=<unix seconds>,v1=<hex HMAC-SHA256 of "t.payload">`.
import { createHmac } from 'node:crypto'
import type { FakeEvent } from './objects'

export function signPayload(payload: string, secret: string, timestamp = Math.floor(Date.now() / 1000)): string {
  const signature = createHmac('sha256', secret).update(`${timestamp}.${payload}`, 'utf8').digest('hex')
  return `t=${timestamp},v1=${signature}`
}

export interface Delivery {
  eventId: string
  type: string
  attempts: number
  lastStatus: number | null
  lastError: string | null
  delivered: boolean
}

export interface WebhookSenderOptions {
  url: string | null
  secret: string
  /** Waits between attempts; one attempt more than there are delays. */
  retryDelaysMs: number[]
  log: (line: string) => void
}

/** Sends each event to the one endpoint, retrying on a non-2xx answer or a refused connection. */
export class WebhookSender {
  readonly deliveries: Delivery[] = []
  private pending = new Set<ReturnType<typeof setTimeout>>()
  private inFlight = 0
  private closed = false
  /** While held, new events wait here instead of going out (tests use it to deliver in an order of their choosing). */
  private held: { delivery: Delivery, payload: string }[] | null = null

  constructor(private readonly options: WebhookSenderOptions) {}

  send(event: FakeEvent, options: { now?: boolean } = {}): Delivery {
    const delivery: Delivery = { eventId: event.id, type: event.type, attempts: 0, lastStatus: null, lastError: null, delivered: false }
    this.deliveries.push(delivery)
    if (!this.options.url) return delivery
    // Like the real service, pretty-printed JSON: the app must verify the bytes it received, not a re-serialisation.
    const payload = JSON.stringify(event, null, 2)
    if (this.held && !options.now) this.held.push({ delivery, payload })
    else this.schedule(delivery, payload, 0)
    return delivery
  }

  /** Holds every new event until release(). */
  hold() {
    this.held ??= []
  }

  /** Sends what was held, in the order it was made, and stops holding. */
  release() {
    const queued = this.held ?? []
    this.held = null
    for (const { delivery, payload } of queued) this.schedule(delivery, payload, 0)
    return queued.length
  }

  private schedule(delivery: Delivery, payload: string, waitMs: number) {
    const timer = setTimeout(() => {
      this.pending.delete(timer)
      void this.attempt(delivery, payload)
    }, waitMs)
    this.pending.add(timer)
  }

  private async attempt(delivery: Delivery, payload: string) {
    if (this.closed || !this.options.url) return
    delivery.attempts++
    this.inFlight++
    try {
      const res = await fetch(this.options.url, {
        method: 'POST',
        headers: {
          'content-type': 'application/json; charset=utf-8',
          'stripe-signature': signPayload(payload, this.options.secret),
          'user-agent': 'torquewright-payments-fake/1.0',
        },
        body: payload,
        signal: AbortSignal.timeout(10_000),
      })
      await res.arrayBuffer()
      delivery.lastStatus = res.status
      delivery.lastError = null
      delivery.delivered = res.ok
    }
    catch (error) {
      delivery.lastStatus = null
      delivery.lastError = error instanceof Error ? (error.cause instanceof Error ? error.cause.message : error.message) : String(error)
    }
    finally {
      this.inFlight--
    }
    if (delivery.delivered) {
      this.options.log(`webhook ${delivery.type} ${delivery.eventId} delivered (${delivery.lastStatus})`)
      return
    }
    const wait = this.options.retryDelaysMs[delivery.attempts - 1]
    this.options.log(`webhook ${delivery.type} ${delivery.eventId} attempt ${delivery.attempts} failed (${delivery.lastStatus ?? delivery.lastError})${wait === undefined ? ', giving up' : `, retrying in ${wait} ms`}`)
    if (wait !== undefined) this.schedule(delivery, payload, wait)
  }

  /** True once nothing is waiting or on the wire. */
  idle(): boolean {
    return this.pending.size === 0 && this.inFlight === 0
  }

  close() {
    this.closed = true
    for (const t of this.pending) clearTimeout(t)
    this.pending.clear()
  }
}
