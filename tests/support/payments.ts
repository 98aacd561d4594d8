import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import Stripe from 'stripe'
import { inject } from 'vitest'

/** The official SDK pointed at a payments fake, as the app's own client is. */
export function stripeClient(port: number, key: string): Stripe {
  return new Stripe(key, { host: '127.0.0.1', port, protocol: 'http', maxNetworkRetries: 0, telemetry: false })
}

/** The SDK against the fake the global setup started (the one the app uses). */
export function runningFakeClient(): Stripe {
  return stripeClient(Number(new URL(inject('paymentsUrl')).port), inject('paymentsKeys').secretKey)
}

export interface ReceivedWebhook {
  raw: string
  signature: string
  event: { id: string, type: string, data: { object: Record<string, unknown> } }
}

/**
 * A small HTTP endpoint standing in for the app's webhook route: it answers each delivery with the
 * next status of `plan` (then 200), and keeps the raw body and signature of every delivery.
 */
export async function webhookReceiver(plan: number[] = []): Promise<{ url: string, received: ReceivedWebhook[], close: () => Promise<void> }> {
  const received: ReceivedWebhook[] = []
  const statuses = [...plan]
  const server: Server = createServer((req, res) => {
    const chunks: Buffer[] = []
    req.on('data', (c: Buffer) => chunks.push(c))
    req.on('end', () => {
      const raw = Buffer.concat(chunks).toString('utf8')
      received.push({ raw, signature: String(req.headers['stripe-signature'] ?? ''), event: JSON.parse(raw) })
      res.statusCode = statuses.shift() ?? 200
      res.end()
    })
  })
  await new Promise<void>(r => server.listen(0, '127.0.0.1', () => r()))
  return {
    url: `http://127.0.0.1:${(server.address() as AddressInfo).port}/hook`,
    received,
    close: () => new Promise<void>((r) => {
      server.closeAllConnections()
      server.close(() => r())
    }),
  }
}

/** Polls until `check` returns a value (not undefined/false), or fails after `timeoutMs`. */
export async function eventually<T>(what: string, check: () => Promise<T | undefined | false> | T | undefined | false, timeoutMs = 15_000): Promise<T> {
  const until = Date.now() + timeoutMs
  for (;;) {
    const value = await check()
    if (value !== undefined && value !== false) return value
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`)
    await new Promise(r => setTimeout(r, 100))
  }
}

/** Submits the fake's hosted payment page as a browser form would. */
export async function payOnFakePage(sessionUrl: string, cardNumber: string, extra: Partial<Record<'expiry' | 'cvc' | 'name' | 'email', string>> = {}) {
  const body = new URLSearchParams({ email: 'payer@racer.test', name: 'Test Payer', cardNumber, expiry: '12/39', cvc: '123', ...extra })
  const res = await fetch(sessionUrl, { method: 'POST', body, redirect: 'manual' })
  return { status: res.status, location: res.headers.get('location'), html: await res.text() }
}

export const CARDS = { succeeds: '4242 4242 4242 4242', declined: '4000 0000 0000 0002', insufficientFunds: '4000 0000 0000 9995' } as const
