// Request threads: messages both ways with attachments, how far each party has read, unread
// counts, and an e-mail to the other party when they are not on the thread's page.
import { and, asc, count, eq, gt, inArray, sql } from 'drizzle-orm'
import { isError } from 'h3'
import type { MessageInput } from '../../shared/schemas/deals'
import { files, messageReads, quoteRequests, requestAttachments, requestMessages, users } from '../database/schema'
import { inRetriedTransaction } from '../utils/transaction'
import { type DealActor, type DealContext, type Executor, lockRequest, notFound, partiesOf, requestVisibleTo, sideOf } from './deal-context'
import { claimFiles } from './deal-files'
import { enqueueMail } from './outbox'

/** A party whose page polled the thread this recently is on the page, so no e-mail is sent for a new message. */
export const PRESENCE_WINDOW_MS = 20_000

export interface ThreadAttachment {
  id: number
  name: string
  mime: string
  sizeBytes: number
}

export interface ThreadMessage {
  id: number
  kind: 'message' | 'event'
  senderId: number | null
  senderName: string | null
  mine: boolean
  body: string
  createdAt: string
  attachments: ThreadAttachment[]
}

/** Posts a message on a thread the actor is a party to, and tells the other party by e-mail if they are away. */
export async function postMessage(ctx: DealContext, actor: DealActor, requestId: number, input: MessageInput): Promise<ThreadMessage> {
  // Only "no such request" reads as not found; a database that is away must surface as itself (503), not as a 404.
  const parties = await partiesOf(ctx.db, requestId).catch((error: unknown) => {
    if (isError(error) && error.statusCode === 404) return null
    throw error
  })
  const side = parties ? sideOf(actor, parties) : null
  if (!parties || !side) throw notFound('That request')
  const now = ctx.now()
  // The request row first (locked and updated), then the rows that refer to it: two posts at once
  // queue on that one lock instead of each holding the foreign key's shared lock and deadlocking.
  // Run again from the start if it still loses a lock conflict: everything it writes rolls back with it.
  const messageId = await inRetriedTransaction(ctx.db, async (tx) => {
    await lockRequest(tx, requestId)
    await tx.update(quoteRequests).set({ lastMessageAt: now }).where(eq(quoteRequests.id, requestId))
    const fileIds = await claimFiles(tx, actor.id, input.attachmentIds, ['attachment', 'photo'])
    const [row] = await tx.insert(requestMessages).values({ requestId, senderId: actor.id, kind: 'message', body: input.body, createdAt: now }).$returningId()
    const id = row!.id
    if (fileIds.length > 0) await tx.insert(requestAttachments).values(fileIds.map(fileId => ({ requestId, messageId: id, fileId })))
    await markRead(tx, actor.id, requestId, id, now)
    const other = side === 'racer'
      ? { userId: parties.shopUserId, email: parties.shopEmail, name: parties.shopName }
      : { userId: parties.racerId, email: parties.racerEmail, name: parties.racerName }
    if (!(await isOnPage(tx, other.userId, requestId, now))) {
      const excerpt = input.body.length > 280 ? `${input.body.slice(0, 277)}…` : input.body || '(sent a file)'
      await enqueueMail(tx, other.email, {
        kind: 'new_message', recipientName: other.name, senderName: side === 'racer' ? parties.racerName : parties.shopName,
        title: parties.title, excerpt, link: `${ctx.config.siteUrl}/deals/requests/${requestId}`,
      }, `message:${id}`)
    }
    return id
  })
  const [message] = await threadMessages(ctx.db, actor, requestId, messageId - 1)
  return message!
}

async function isOnPage(tx: Executor, userId: number, requestId: number, now: Date): Promise<boolean> {
  const [read] = await tx.select({ at: messageReads.lastSeenAt }).from(messageReads)
    .where(and(eq(messageReads.requestId, requestId), eq(messageReads.userId, userId))).limit(1)
  return !!read && now.getTime() - read.at.getTime() < PRESENCE_WINDOW_MS
}

/** Records that the user has read the thread up to a message and is looking at it now. */
export async function markRead(tx: Executor, userId: number, requestId: number, upToMessageId: number, now: Date): Promise<void> {
  await tx.insert(messageReads).values({ requestId, userId, lastReadMessageId: upToMessageId, lastSeenAt: now })
    .onDuplicateKeyUpdate({ set: { lastReadMessageId: sql`GREATEST(${messageReads.lastReadMessageId}, ${upToMessageId})`, lastSeenAt: now } })
}

/** Messages of a thread after a given id, oldest first, with their attachments; the actor must be a party (or an admin). */
export async function threadMessages(db: Executor, actor: DealActor, requestId: number, afterId = 0): Promise<ThreadMessage[]> {
  const [visible] = await db.select({ id: quoteRequests.id }).from(quoteRequests).where(and(eq(quoteRequests.id, requestId), requestVisibleTo(actor))).limit(1)
  if (!visible) throw notFound('That request')
  const list = await db.select({
    id: requestMessages.id, kind: requestMessages.kind, senderId: requestMessages.senderId, senderName: users.name, body: requestMessages.body, createdAt: requestMessages.createdAt,
  }).from(requestMessages).leftJoin(users, eq(users.id, requestMessages.senderId))
    .where(and(eq(requestMessages.requestId, requestId), gt(requestMessages.id, afterId)))
    .orderBy(asc(requestMessages.id)).limit(500)
  const ids = list.map(m => m.id)
  const attachments = ids.length === 0
    ? []
    : await db.select({ messageId: requestAttachments.messageId, id: files.id, name: files.originalName, mime: files.mime, sizeBytes: files.sizeBytes })
        .from(requestAttachments).innerJoin(files, eq(files.id, requestAttachments.fileId))
        .where(inArray(requestAttachments.messageId, ids)).orderBy(asc(requestAttachments.id))
  return list.map(m => ({
    id: m.id,
    kind: m.kind,
    senderId: m.senderId,
    senderName: m.senderName,
    mine: m.senderId === actor.id,
    body: m.body,
    createdAt: m.createdAt.toISOString(),
    attachments: attachments.filter(a => a.messageId === m.id).map(({ messageId: _m, ...a }) => a),
  }))
}

/** The poll behind a thread page: new messages after `afterId`, and the reader marked present and up to date. */
export async function pollThread(ctx: DealContext, actor: DealActor, requestId: number, afterId: number) {
  const messages = await threadMessages(ctx.db, actor, requestId, afterId)
  const last = messages.at(-1)?.id ?? afterId
  if (actor.role !== 'admin' || (await isParty(ctx.db, actor, requestId))) {
    await markRead(ctx.db, actor.id, requestId, last, ctx.now())
  }
  return { messages, lastId: last }
}

async function isParty(db: Executor, actor: DealActor, requestId: number): Promise<boolean> {
  const parties = await partiesOf(db, requestId)
  return sideOf(actor, parties) !== null
}

/** Unread messages per thread for the navigation: messages from the other party (or the system) after the reader's mark. */
export async function unreadCounts(db: Executor, actor: DealActor): Promise<{ total: number, threads: { requestId: number, unread: number }[] }> {
  if (actor.role === 'admin') return { total: 0, threads: [] }
  const party = actor.shopId === null
    ? eq(quoteRequests.racerId, actor.id)
    : sql`(${quoteRequests.racerId} = ${actor.id} OR ${quoteRequests.shopId} = ${actor.shopId})`
  const rows = await db.select({ requestId: requestMessages.requestId, unread: count() }).from(requestMessages)
    .innerJoin(quoteRequests, eq(quoteRequests.id, requestMessages.requestId))
    .leftJoin(messageReads, and(eq(messageReads.requestId, requestMessages.requestId), eq(messageReads.userId, actor.id)))
    .where(and(
      party,
      sql`(${requestMessages.senderId} IS NULL OR ${requestMessages.senderId} <> ${actor.id})`,
      gt(requestMessages.id, sql`COALESCE(${messageReads.lastReadMessageId}, 0)`),
    ))
    .groupBy(requestMessages.requestId)
  const threads = rows.map(r => ({ requestId: r.requestId, unread: Number(r.unread) }))
  return { total: threads.reduce((a, t) => a + t.unread, 0), threads }
}
