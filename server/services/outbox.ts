// The e-mail outbox: mail is written in the same transaction as the change it reports, then sent
// by the drainer and retried with a growing wait, so none is lost while SMTP is down.
import { createHash } from 'node:crypto'
import { and, asc, eq, inArray, isNull, lte, lt, sql } from 'drizzle-orm'
import { mailOutbox, type OutboxMail } from '../database/schema'
import type { Database } from '../database/types'
import { retryOnLockConflict } from '../utils/transaction'
import type { Executor } from './deal-context'
import { renderDealMail, type DealMail, type RenderedMail } from './mail-templates'
import { mailSwitchedOff } from './notifications'

/** After this many failed attempts a mail stays in the table with its last error, for a person to look at. */
export const MAX_ATTEMPTS = 12

/** How long a claimed mail is left alone by other drainers while it is being sent. */
const LEASE_MS = 2 * 60_000

/** The right-hand side of a Message-ID when the caller gives no host (a reserved name, RFC 2606). */
const DEFAULT_MESSAGE_ID_HOST = 'torquewright.invalid'

/** Wait before the next attempt: 15 s doubled per failure, at most an hour. */
export function retryDelayMs(attempts: number): number {
  return Math.min(15_000 * 2 ** Math.max(0, attempts - 1), 60 * 60_000)
}

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html: string
  /** The Message-ID header (RFC 5322 §3.6.4): the same for every send of one outbox row. */
  messageId: string
}

/**
 * The stable Message-ID of an outbox row: `<outbox-<id>.<hash>@<host>>`, the hash taken over the row's
 * fixed fields, so a mail sent again after a crash carries the same Message-ID as the first send and
 * the receiving side can tell it is the same message.
 */
export function outboxMessageId(mail: Pick<OutboxMail, 'id' | 'dedupeKey' | 'toAddress' | 'createdAt'>, host: string): string {
  const hash = createHash('sha256').update(`${mail.id}\n${mail.dedupeKey ?? ''}\n${mail.toAddress}\n${mail.createdAt.toISOString()}`).digest('hex').slice(0, 16)
  return `<outbox-${mail.id}.${hash}@${host}>`
}

/**
 * Queues one deal e-mail; a repeated dedupe key (the same event reported twice) queues nothing, and
 * neither does a kind of mail the recipient has switched off on their notifications page.
 */
export async function enqueueMail(tx: Executor, to: string, mail: DealMail, dedupeKey: string | null = null): Promise<void> {
  if (!to || await mailSwitchedOff(tx, to, mail.kind)) return
  await enqueueRendered(tx, to, renderDealMail(mail), dedupeKey)
}

/**
 * Queues a mail after the response has gone: where how long the answer takes must not tell whether an
 * address is registered (sign-up, sign-in links, address changes). A failure is logged, never shown to
 * the caller; the drainer sends it as it sends every other mail.
 */
export function enqueueAfterResponse(event: { waitUntil?: (p: Promise<unknown>) => void }, db: Executor, mail: { to: string } & RenderedMail): void {
  const queued = enqueueRendered(db, mail.to, mail).catch((err: Error) => console.error(`[mail] could not queue "${mail.subject}" for ${mail.to}: ${err.message}`))
  if (event.waitUntil) event.waitUntil(queued)
}

/** Queues one e-mail already rendered; a repeated dedupe key queues nothing. */
export async function enqueueRendered(tx: Executor, to: string, rendered: RenderedMail, dedupeKey: string | null = null): Promise<void> {
  if (!to) return
  await tx.insert(mailOutbox).values({
    dedupeKey, toAddress: to, subject: rendered.subject.slice(0, 200), text: rendered.text, html: rendered.html,
  }).onDuplicateKeyUpdate({ set: { dedupeKey } })
}

export interface DrainResult {
  sent: number
  failed: number
}

/** What a send that never reported back leaves on its row until the next attempt's outcome replaces it. */
export const CLAIMED_NOTE = 'claimed for sending; no outcome was recorded (the sender stopped before it could say)'

/**
 * Sends what is due. Each mail is marked before it is sent and again after: the claim counts the
 * attempt and pushes the next one past a lease (so two drainers never send the same mail), then the
 * mail goes out outside any transaction with its row's stable Message-ID, then sentAt (or the error
 * and the wait before the next attempt) is recorded. A crash between the send and the record sends it
 * again after the lease: delivery is at least once, and a repeat carries the same Message-ID.
 */
export async function drainOutbox(db: Database, send: (mail: OutgoingMail) => Promise<void>, opts: { now?: Date, batch?: number, host?: string } = {}): Promise<DrainResult> {
  const now = opts.now ?? new Date()
  const batch = opts.batch ?? 20
  const host = opts.host ?? DEFAULT_MESSAGE_ID_HOST
  const claimed: OutboxMail[] = await retryOnLockConflict(() => db.transaction(async (tx) => {
    const due = await tx.select().from(mailOutbox)
      .where(and(isNull(mailOutbox.sentAt), lte(mailOutbox.nextAttemptAt, now), lt(mailOutbox.attempts, MAX_ATTEMPTS)))
      .orderBy(asc(mailOutbox.id)).limit(batch).for('update', { skipLocked: true })
    if (due.length > 0) {
      await tx.update(mailOutbox).set({ attempts: sql`${mailOutbox.attempts} + 1`, nextAttemptAt: new Date(now.getTime() + LEASE_MS), lastError: CLAIMED_NOTE })
        .where(inArray(mailOutbox.id, due.map(m => m.id)))
    }
    return due
  }))
  const result: DrainResult = { sent: 0, failed: 0 }
  for (const mail of claimed) {
    const attempts = mail.attempts + 1
    try {
      await send({ to: mail.toAddress, subject: mail.subject, text: mail.text, html: mail.html, messageId: outboxMessageId(mail, host) })
      await db.update(mailOutbox).set({ sentAt: new Date(), lastError: null }).where(eq(mailOutbox.id, mail.id))
      result.sent++
    }
    catch (error) {
      await db.update(mailOutbox).set({
        nextAttemptAt: new Date(now.getTime() + retryDelayMs(attempts)),
        lastError: (error instanceof Error ? error.message : String(error)).slice(0, 1000),
      }).where(eq(mailOutbox.id, mail.id))
      result.failed++
    }
  }
  return result
}
