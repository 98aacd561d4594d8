// What every deal service is given (database, Stripe client, settings, clock), who is acting, and
// the small helpers they share. Services take this context as a parameter so the tests can call
// them against the real test database and the running payments fake.
import { eq } from 'drizzle-orm'
import { createError } from 'h3'
import { shops, dealEvents, quoteRequests, users } from '../database/schema'
import type { DealActor, Executor } from '../utils/deal-scope'

export { loadActor, requestVisibleTo, type DbTransaction, type DealActor, type DealConfig, type DealContext, type Executor } from '../utils/deal-scope'

export const notFound = (what: string) => createError({ status: 404, message: `${what} was not found, or it is not yours to see.` })
export const forbidden = (message: string) => createError({ status: 403, message })
export const conflict = (message: string) => createError({ status: 409, message })
export const unprocessable = (message: string) => createError({ status: 422, message })

/** A 502 that says what the payment service answered, so the person can try again or report it. */
export function paymentServiceError(what: string, error: unknown) {
  const message = error instanceof Error ? error.message : String(error)
  return createError({ status: 502, message: `The payment service refused to ${what}: ${message}` })
}

/** True for MariaDB's duplicate-key error, however drizzle wraps it. */
export function isDuplicateKey(error: unknown): boolean {
  for (let e: unknown = error; e && typeof e === 'object'; e = (e as { cause?: unknown }).cause) {
    if ((e as { code?: string }).code === 'ER_DUP_ENTRY' || (e as { errno?: number }).errno === 1062) return true
  }
  return false
}

/** Today's date (UTC) as YYYY-MM-DD. */
export const isoDay = (d: Date) => d.toISOString().slice(0, 10)

/**
 * Locks a quote request's row for the rest of the transaction. Taken before the first row that refers
 * to the request is written: MariaDB's foreign-key check takes a shared lock on the parent row, and
 * two transactions that each hold it and then update the parent (its last_message_at, its status)
 * deadlock. The lock order everywhere is order, milestone, then request; a request's own writes
 * (messages, quotes) take the request first and touch no order or milestone row after it.
 */
export async function lockRequest(tx: Executor, requestId: number): Promise<void> {
  await tx.select({ id: quoteRequests.id }).from(quoteRequests).where(eq(quoteRequests.id, requestId)).limit(1).for('update')
}

/** Appends to a deal's history (the order page's timeline and the audit trail of money), under the request's lock. */
export async function recordDealEvent(tx: Executor, e: { requestId: number, orderId?: number | null, milestoneId?: number | null, actorId?: number | null, action: string, detail?: string }) {
  await lockRequest(tx, e.requestId)
  await tx.insert(dealEvents).values({
    requestId: e.requestId, orderId: e.orderId ?? null, milestoneId: e.milestoneId ?? null, actorId: e.actorId ?? null, action: e.action, detail: (e.detail ?? '').slice(0, 500),
  })
}

/** The two parties of a request: the racer and the shop's owner, with their e-mail addresses. */
export async function partiesOf(db: Executor, requestId: number) {
  const [row] = await db.select({
    requestId: quoteRequests.id, title: quoteRequests.title, racerId: quoteRequests.racerId, shopId: quoteRequests.shopId,
    racerEmail: users.email, racerName: users.name, shopName: shops.shopName, shopUserId: shops.userId,
  }).from(quoteRequests)
    .innerJoin(users, eq(users.id, quoteRequests.racerId))
    .innerJoin(shops, eq(shops.id, quoteRequests.shopId))
    .where(eq(quoteRequests.id, requestId)).limit(1)
  if (!row) throw notFound('That request')
  const [shopUser] = await db.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, row.shopUserId)).limit(1)
  return {
    ...row,
    shopEmail: shopUser?.email ?? '',
    ownerName: shopUser?.name ?? row.shopName,
  }
}

export type Parties = Awaited<ReturnType<typeof partiesOf>>

/** The actor's side of a request, or null when they are not a party. */
export function sideOf(actor: DealActor, parties: { racerId: number, shopId: number }): 'racer' | 'builder' | null {
  if (actor.id === parties.racerId) return 'racer'
  if (actor.shopId !== null && actor.shopId === parties.shopId) return 'builder'
  return null
}
