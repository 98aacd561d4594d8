// Who acts on a deal and what the deal services are given: the types and the two helpers the request
// guards (server/utils/deal-actor.ts) and the deal services share. It lives below the services, which
// re-export it from server/services/deal-context.ts.
import { eq, or, sql, type SQL } from 'drizzle-orm'
import type Stripe from 'stripe'
import type { Role } from '../../shared/domain'
import { shops, quoteRequests, users } from '../database/schema'
import type { Database } from '../database/types'

export type DbTransaction = Parameters<Parameters<Database['transaction']>[0]>[0]
export type Executor = Database | DbTransaction

export interface DealConfig {
  /** The platform's fee in basis points of a quote's total (500 = 5 %), deducted from the shop's payouts. */
  platformFeeBps: number
  /** Days after a submission when a milestone the racer has not answered is approved on its own. */
  autoApproveDays: number
  /** The app's public address, for links in e-mails and Checkout's return addresses. */
  siteUrl: string
}

export interface DealContext {
  db: Database
  stripe: Stripe
  config: DealConfig
  now: () => Date
}

/** The signed-in user as the deal services see them: their id, role and, for a shop, their shop. */
export interface DealActor {
  id: number
  role: Role
  email: string
  name: string
  shopId: number | null
}

/** Loads the acting user with their shop, or null when there is no such user (or they are suspended). */
export async function loadActor(db: Executor, userId: number): Promise<DealActor | null> {
  const [row] = await db.select({ user: users, shopId: shops.id }).from(users)
    .leftJoin(shops, eq(shops.userId, users.id))
    .where(eq(users.id, userId)).limit(1)
  if (!row || row.user.suspendedAt) return null
  return { id: row.user.id, role: row.user.role, email: row.user.email, name: row.user.name, shopId: row.shopId ?? null }
}

/** The condition that limits quote requests to those the actor is a party to (admins see all). */
export function requestVisibleTo(actor: DealActor): SQL {
  if (actor.role === 'admin') return sql`1 = 1`
  return or(eq(quoteRequests.racerId, actor.id), actor.shopId === null ? sql`1 = 0` : eq(quoteRequests.shopId, actor.shopId))!
}
