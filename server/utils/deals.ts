import type Stripe from 'stripe'
import type { DealContext } from './deal-scope'
import { createStripeClient } from './stripe'

let stripe: Stripe | undefined

/** The server's one Stripe client, from runtime config (the local fake when NUXT_STRIPE_API_HOST is set). */
export function useStripe(): Stripe {
  if (!stripe) {
    const c = useRuntimeConfig()
    stripe = createStripeClient({ secretKey: c.stripeSecretKey, apiHost: c.stripeApiHost, apiPort: c.stripeApiPort, apiProtocol: c.stripeApiProtocol })
  }
  return stripe
}

/** The app's public address for links in deal e-mails and Checkout's return addresses, without a trailing slash. */
export function dealSiteUrl(): string {
  return (useRuntimeConfig().public.siteUrl || `http://127.0.0.1:${process.env.PORT ?? 3000}`).replace(/\/$/, '')
}

/** What the deal services are given in a request: the database, the Stripe client (made on first use), settings and the clock. */
export function useDealContext(): DealContext {
  const c = useRuntimeConfig()
  return {
    db: useDb(),
    get stripe() {
      return useStripe()
    },
    config: {
      platformFeeBps: Number(c.platformFeeBps),
      autoApproveDays: Number(c.autoApproveDays),
      siteUrl: dealSiteUrl(),
    },
    now: () => new Date(),
  }
}
