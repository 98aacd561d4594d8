// The Stripe SDK client the deal services are given: pointed at the local payments fake when a host is set.
import { createError } from 'h3'
import Stripe from 'stripe'

export interface StripeSettings {
  secretKey: string
  /** Set to reach the local payments fake; left empty, the SDK talks to Stripe itself. */
  apiHost?: string
  apiPort?: string | number
  apiProtocol?: string
}

/** The SDK client, pointed at the fake when a host is configured, with telemetry off. */
export function createStripeClient(settings: StripeSettings): Stripe {
  if (!settings.secretKey) throw createError({ status: 503, message: 'Payments are not configured (set NUXT_STRIPE_SECRET_KEY).' })
  const override = settings.apiHost
    ? { host: settings.apiHost, port: settings.apiPort ? Number(settings.apiPort) : undefined, protocol: settings.apiProtocol === 'http' ? 'http' as const : 'https' as const }
    : {}
  return new Stripe(settings.secretKey, { ...override, maxNetworkRetries: 2, timeout: 20_000, telemetry: false })
}
