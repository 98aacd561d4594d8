// The e-mail outbox: mail is written in the same transaction as the change it reports, then sent
// by the drainer and retried with a growing wait, so none is lost while SMTP is down.
import { and, asc, eq, inArray, isNull, lte, lt } from 'drizzle-orm'
import { mailOutbox, type OutboxMail } from '../database/schema'
import type { Database } from '../database/types'
import type { Executor } from './deal-context'
import { renderDealMail, type DealMail, type RenderedMail } from './mail-templates'

/** After this many failed attempts a mail stays in the table with its last error, for a person to look at. */
export const MAX_ATTEMPTS = 12

/** How long a claimed mail is left alone by other drainers while it is being sent. */
const LEASE_MS = 2 * 60_000

/** Wait before the next attempt: 15 s doubled per failure, at most an hour. */
export function retryDelayMs(attempts: number): number {
  return Math.min(15_000 * 2 ** Math.max(0, attempts - 1), 60 * 60_000)
}

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html: string
}

/** Queues one deal e-mail; a repeated dedupe key (the same event reported twice) queues nothing. */
export async function enqueueMail(tx: Executor, to: string, mail: DealMail, dedupeKey: string | null = null): Promise<void> {
  await enqueueRendered(tx, to, renderDealMail(mail), dedupeKey)
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

/**
 * Sends what is due: claims a batch by pushing its next attempt past a lease (so two drainers never
 * send the same mail), sends each outside any transaction, then records the outcome.
 */
export async function drainOutbox(db: Database, send: (mail: OutgoingMail) => Promise<void>, opts: { now?: Date, batch?: number } = {}): Promise<DrainResult> {
  const now = opts.now ?? new Date()
  const batch = opts.batch ?? 20
  const claimed: OutboxMail[] = await db.transaction(async (tx) => {
    const due = await tx.select().from(mailOutbox)
      .where(and(isNull(mailOutbox.sentAt), lte(mailOutbox.nextAttemptAt, now), lt(mailOutbox.attempts, MAX_ATTEMPTS)))
      .orderBy(asc(mailOutbox.id)).limit(batch).for('update', { skipLocked: true })
    if (due.length > 0) {
      await tx.update(mailOutbox).set({ nextAttemptAt: new Date(now.getTime() + LEASE_MS) }).where(inArray(mailOutbox.id, due.map(m => m.id)))
    }
    return due
  })
  const result: DrainResult = { sent: 0, failed: 0 }
  for (const mail of claimed) {
    try {
      await send({ to: mail.toAddress, subject: mail.subject, text: mail.text, html: mail.html })
      await db.update(mailOutbox).set({ sentAt: new Date(), attempts: mail.attempts + 1, lastError: null }).where(eq(mailOutbox.id, mail.id))
      result.sent++
    }
    catch (error) {
      const attempts = mail.attempts + 1
      await db.update(mailOutbox).set({
        attempts,
        nextAttemptAt: new Date(now.getTime() + retryDelayMs(attempts)),
        lastError: (error instanceof Error ? error.message : String(error)).slice(0, 1000),
      }).where(eq(mailOutbox.id, mail.id))
      result.failed++
    }
  }
  return result
}
