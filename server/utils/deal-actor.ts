import type { H3Event } from 'h3'
import { type DealActor, loadActor } from '../services/deal-context'

/**
 * The signed-in user as the deal services see them (with their shop, for a builder); 401 when no
 * one is signed in. Sign-in is not on this branch yet, so for now every deal route answers 401.
 */
export async function requireDealActor(event: H3Event): Promise<DealActor> {
  const userId = (event.context as { dealUserId?: number }).dealUserId
  const actor = userId ? await loadActor(useDb(), userId) : null
  if (!actor) throw createError({ status: 401, message: 'Sign in to see your deals.' })
  return actor
}
