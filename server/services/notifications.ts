// The notifications page: the deal events of the caller's deals with a read mark, and the switches
// that turn groups of deal e-mail off (checked by the outbox when a deal mail is queued).
import { and, count, desc, eq, gt, max, or, sql, type SQL } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import { EMAIL_GROUPS, dealEventWords, type EmailGroup } from '../../shared/deals/notifications'
import type { NotificationSettingsPatch, NotificationsQuery } from '../../shared/schemas/notifications'
import type { NotificationList } from '../../shared/types/notifications'
import { dealEvents, notificationSettings, quoteRequests, users } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import type { DealActor, Executor } from './deal-context'
import type { DealMail } from './mail-templates'

/**
 * Which switch governs each deal e-mail; null = always sent (refunds and settlements concern money
 * already paid). A Record, so a new kind of deal mail does not compile until it is placed here.
 */
export const MAIL_GROUP: Record<DealMail['kind'], EmailGroup | null> = {
  new_request: 'requests',
  new_message: 'messages',
  quote_sent: 'quotes',
  quote_accepted: 'quotes',
  // A change order is a revised quote for the rest of an order.
  change_order_sent: 'quotes',
  change_order_answered: 'quotes',
  milestone_funded: 'payments',
  milestone_released: 'payments',
  milestone_submitted: 'milestones',
  milestone_approved: 'milestones',
  milestone_refunded: null,
  dispute_settled: null,
  review_written: 'reviews',
}

/** The events of deals the actor is a party to, less their own actions; null for an admin (who is a party to none). */
function partyEvents(actor: DealActor): SQL | null {
  if (actor.role === 'admin') return null
  const party = actor.shopId === null
    ? eq(quoteRequests.racerId, actor.id)
    : or(eq(quoteRequests.racerId, actor.id), eq(quoteRequests.shopId, actor.shopId))
  return and(party, sql`(${dealEvents.actorId} IS NULL OR ${dealEvents.actorId} <> ${actor.id})`)!
}

async function settingsOf(db: Executor, userId: number) {
  const [row] = await db.select().from(notificationSettings).where(eq(notificationSettings.userId, userId)).limit(1)
  return { readUpTo: row?.readUpToEventId ?? 0, emailOff: row?.emailOff ?? [] }
}

const emailSwitches = (off: string[]) => Object.fromEntries(EMAIL_GROUPS.map(g => [g, !off.includes(g)])) as Record<EmailGroup, boolean>

/** One page of the actor's notifications, unread first then newest first, with the counts and the e-mail switches. */
export async function listNotifications(db: Database, actor: DealActor, q: NotificationsQuery): Promise<NotificationList> {
  const { readUpTo, emailOff } = await settingsOf(db, actor.id)
  const where = partyEvents(actor)
  const empty = { notifications: [], page: q.page, perPage: q.perPage, total: 0, unread: 0, email: emailSwitches(emailOff) }
  if (!where) return empty
  const [counts] = await db.select({ total: count(), unread: sql<string>`COALESCE(SUM(${dealEvents.id} > ${readUpTo}), 0)` })
    .from(dealEvents).innerJoin(quoteRequests, eq(quoteRequests.id, dealEvents.requestId)).where(where)
  const actorUser = alias(users, 'actor_user')
  const rows = await db.select({
    id: dealEvents.id, action: dealEvents.action, detail: dealEvents.detail, createdAt: dealEvents.createdAt,
    requestId: dealEvents.requestId, orderId: dealEvents.orderId, title: quoteRequests.title, actorName: actorUser.name,
  }).from(dealEvents)
    .innerJoin(quoteRequests, eq(quoteRequests.id, dealEvents.requestId))
    .leftJoin(actorUser, eq(actorUser.id, dealEvents.actorId))
    .where(where)
    // Unread first (the mark only moves forward, so they are also the newest), then newest first.
    .orderBy(desc(sql`${dealEvents.id} > ${readUpTo}`), desc(dealEvents.id))
    .limit(q.perPage).offset((q.page - 1) * q.perPage)
  return {
    ...empty,
    total: Number(counts?.total ?? 0),
    unread: Number(counts?.unread ?? 0),
    notifications: rows.map(r => ({
      id: r.id,
      action: r.action,
      words: dealEventWords(r.action),
      detail: r.detail,
      actorName: r.actorName ?? null,
      title: r.title,
      link: r.orderId ? `/deals/orders/${r.orderId}` : `/deals/requests/${r.requestId}`,
      createdAt: r.createdAt.toISOString(),
      unread: r.id > readUpTo,
    })),
  }
}

/**
 * Moves the actor's read mark forward: to their newest event, or to `upTo` when given (never past their
 * newest event, so events still to come stay unread). The mark never moves back. Answers the unread count left.
 */
export async function markNotificationsRead(db: Database, actor: DealActor, upTo: number | null): Promise<{ unread: number }> {
  const where = partyEvents(actor)
  if (where) {
    const [newest] = await db.select({ id: max(dealEvents.id) }).from(dealEvents)
      .innerJoin(quoteRequests, eq(quoteRequests.id, dealEvents.requestId)).where(where)
    const mark = Math.min(upTo ?? Number.MAX_SAFE_INTEGER, Number(newest?.id ?? 0))
    if (mark > 0) {
      await db.insert(notificationSettings).values({ userId: actor.id, readUpToEventId: mark, emailOff: [] })
        .onDuplicateKeyUpdate({ set: { readUpToEventId: sql`GREATEST(${notificationSettings.readUpToEventId}, ${mark})` } })
    }
  }
  return { unread: await unreadCount(db, actor) }
}

/** How many of the actor's events are past their read mark (the navigation's badge). */
export async function unreadCount(db: Executor, actor: DealActor): Promise<number> {
  const where = partyEvents(actor)
  if (!where) return 0
  const { readUpTo } = await settingsOf(db, actor.id)
  const [row] = await db.select({ n: count() }).from(dealEvents)
    .innerJoin(quoteRequests, eq(quoteRequests.id, dealEvents.requestId))
    .where(and(where, gt(dealEvents.id, readUpTo)))
  return Number(row?.n ?? 0)
}

/** Switches groups of deal e-mail on or off for the actor; answers every switch as it now stands. */
export async function updateEmailSwitches(db: Database, actor: DealActor, patch: NotificationSettingsPatch): Promise<{ email: Record<EmailGroup, boolean> }> {
  // Safe to repeat: it applies the same switches to whatever is stored when it runs.
  const off = await inRetriedTransaction(db, async (tx) => {
    // The user's row first (the house lock order), so two changes at once apply one after the other.
    await tx.select({ id: users.id }).from(users).where(eq(users.id, actor.id)).limit(1).for('update')
    const current = new Set((await settingsOf(tx, actor.id)).emailOff)
    for (const g of EMAIL_GROUPS) {
      const on = patch.email[g]
      if (on === true) current.delete(g)
      else if (on === false) current.add(g)
    }
    const emailOff = EMAIL_GROUPS.filter(g => current.has(g))
    await tx.insert(notificationSettings).values({ userId: actor.id, emailOff })
      .onDuplicateKeyUpdate({ set: { emailOff } })
    return emailOff
  })
  return { email: emailSwitches(off) }
}

/** True when the account at `to` has switched off the group this deal mail belongs to. */
export async function mailSwitchedOff(db: Executor, to: string, kind: DealMail['kind']): Promise<boolean> {
  const group = MAIL_GROUP[kind]
  if (!group) return false
  const [row] = await db.select({ off: notificationSettings.emailOff }).from(notificationSettings)
    .innerJoin(users, eq(users.id, notificationSettings.userId))
    .where(eq(users.email, to)).limit(1)
  return row?.off.includes(group) ?? false
}
