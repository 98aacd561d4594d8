import { and, eq } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { milestones, orders, quoteRequests, quotes } from '../database/schema'
import { type DealActor, loadActor, requestVisibleTo } from './deal-scope'

type Side = 'racer' | 'builder'

/** The signed-in user as the deal services see them (with their shop, for a shop): 401 when anonymous. */
export async function requireDealActor(event: H3Event): Promise<DealActor> {
  const user = await requireUser(event)
  const actor = await loadActor(useDb(), user.id)
  if (!actor) throw createError({ status: 401, message: 'Sign in to continue.' })
  return actor
}

/**
 * The guard of every route on one deal: 404 unless the caller is a party (or an admin, who may
 * look), then 403 when the action belongs to the other side, or when an admin tries a party's action.
 * It runs before the body is read, so a stranger learns nothing from a validation message.
 */
async function guard(event: H3Event, requestId: number | undefined, side: Side | 'party' | 'any'): Promise<{ actor: DealActor, side: Side | 'admin' }> {
  const actor = await requireDealActor(event)
  const [row] = requestId === undefined
    ? []
    : await useDb().select({ racerId: quoteRequests.racerId, shopId: quoteRequests.shopId }).from(quoteRequests)
        .where(and(eq(quoteRequests.id, requestId), requestVisibleTo(actor))).limit(1)
  if (!row) throw createError({ status: 404, message: 'That deal was not found, or it is not yours to see.' })
  const mine: Side | 'admin' = row.racerId === actor.id ? 'racer' : row.shopId === actor.shopId ? 'builder' : 'admin'
  if (side === 'any') return { actor, side: mine }
  if (mine === 'admin') throw createError({ status: 403, message: 'Only the racer and the shop act on a deal; an admin may look, or settle a dispute.' })
  if (side !== 'party' && mine !== side) throw createError({ status: 403, message: side === 'racer' ? 'This is for the racer of the deal.' : 'This is for the shop of the deal.' })
  return { actor, side: mine }
}

export function requireRequestAccess(event: H3Event, requestId: number, side: Side | 'party' | 'any' = 'any') {
  return guard(event, requestId, side)
}

export async function requireQuoteAccess(event: H3Event, quoteId: number, side: Side | 'party' | 'any' = 'any') {
  const [row] = await useDb().select({ requestId: quotes.requestId }).from(quotes).where(eq(quotes.id, quoteId)).limit(1)
  return guard(event, row?.requestId, side)
}

export async function requireOrderAccess(event: H3Event, orderId: number, side: Side | 'party' | 'any' = 'any') {
  const [row] = await useDb().select({ requestId: orders.requestId }).from(orders).where(eq(orders.id, orderId)).limit(1)
  return guard(event, row?.requestId, side)
}

export async function requireMilestoneAccess(event: H3Event, milestoneId: number, side: Side | 'party' | 'any' = 'any') {
  const [row] = await useDb().select({ requestId: orders.requestId }).from(milestones)
    .innerJoin(orders, eq(orders.id, milestones.orderId)).where(eq(milestones.id, milestoneId)).limit(1)
  return guard(event, row?.requestId, side)
}
