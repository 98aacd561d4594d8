import { processStripeEvent, verifyWebhook } from '../../services/payments'

/**
 * Stripe's (or the local fake's) signed events. The signature is checked over the raw bytes before
 * anything else (400 and nothing changed when it fails); each event id is processed once.
 */
export default defineEventHandler(async (event) => {
  const raw = await readLimitedBody(event, 1024 * 1024)
  const signature = getRequestHeader(event, 'stripe-signature')
  const ctx = useDealContext()
  const verified = verifyWebhook(ctx.stripe, raw, signature, useRuntimeConfig().stripeWebhookSecret)
  const result = await processStripeEvent(ctx, verified)
  return { received: true, ...result }
})
