// The mail outbox: nothing is lost while SMTP is down, a failed mail waits and is tried again, two
// drainers never send one mail twice. Sent over real SMTP (nodemailer) to the tests' mail catcher.
// The rows here are scheduled far in the future so the app's own drainer leaves them to the test.
import { randomUUID } from 'node:crypto'
import { and, count, eq, inArray, isNull, lt } from 'drizzle-orm'
import { createTransport } from 'nodemailer'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Database } from '../../server/database/types'
import { CLAIMED_NOTE, MAX_ATTEMPTS, drainOutbox, enqueueMail, outboxMessageId, retryDelayMs, type OutgoingMail } from '../../server/services/outbox'
import { mailFor } from '../support/context'
import { dealTestContext, schema } from '../support/deals'
import { eventually } from '../support/payments'

let db: Database
let close: () => Promise<void>
beforeAll(async () => {
  ({ db, close } = await dealTestContext())
  // Earlier files leave mail for the app's drainer; wait until it has sent it, so what is due here is ours alone.
  await eventually('the app\'s outbox to empty', async () => {
    const [left] = await db.select({ n: count() }).from(schema.mailOutbox).where(and(isNull(schema.mailOutbox.sentAt), lt(schema.mailOutbox.attempts, MAX_ATTEMPTS)))
    return left!.n === 0
  }, 90_000)
})
afterAll(async () => {
  await close()
})

const FAR = new Date('2100-01-01T00:00:00Z')
const smtp = (port: number) => {
  const transport = createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true, connectionTimeout: 2000 })
  return async (mail: OutgoingMail) => {
    await transport.sendMail({ from: 'Torquewright <no-reply@torquewright.test>', ...mail })
  }
}

/** Queues mails through the service, then moves them out of the app drainer's reach. */
async function queue(n: number) {
  const to = `outbox-${randomUUID().slice(0, 8)}@racer.test`
  for (let i = 0; i < n; i++) {
    await enqueueMail(db, to, { kind: 'new_message', recipientName: 'Test', senderName: 'Shop', title: `Thread ${i}`, excerpt: `Message ${i}`, link: 'http://127.0.0.1/x' }, `test:${to}:${i}`)
  }
  await db.update(schema.mailOutbox).set({ nextAttemptAt: FAR }).where(eq(schema.mailOutbox.toAddress, to))
  return to
}

const rowsFor = (to: string) => db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.toAddress, to))

describe('mail outbox', () => {
  it('keeps a mail while SMTP is down, waits, then delivers it to the catcher', async () => {
    const to = await queue(1)
    // Port 9 on 127.0.0.1 refuses connections: SMTP is down.
    const down = await drainOutbox(db, smtp(9), { now: FAR })
    expect(down).toEqual({ sent: 0, failed: 1 })
    const [failed] = await rowsFor(to)
    expect(failed!.sentAt).toBeNull()
    expect(failed!.attempts).toBe(1)
    expect(failed!.lastError).toMatch(/ECONNREFUSED|connect/i)
    expect(failed!.nextAttemptAt.getTime()).toBe(FAR.getTime() + retryDelayMs(1))
    // Not due yet: nothing is claimed before the wait is over.
    expect(await drainOutbox(db, smtp(inject('mailSmtpPort')), { now: new Date(FAR.getTime() + 1000) })).toEqual({ sent: 0, failed: 0 })
    const up = await drainOutbox(db, smtp(inject('mailSmtpPort')), { now: new Date(FAR.getTime() + retryDelayMs(1)) })
    expect(up.sent).toBeGreaterThanOrEqual(1)
    const [sent] = await rowsFor(to)
    expect(sent!.sentAt).not.toBeNull()
    expect(sent!.attempts).toBe(2)
    const caught = await mailFor(to)
    expect(caught).toHaveLength(1)
    expect(caught[0]!.subject).toBe('New message on "Thread 0"')
    expect(caught[0]!.text).toContain('Shop wrote: "Message 0"')
    expect(caught[0]!.html).toContain('Reply in the thread')
  })

  it('queues nothing twice for the same event (dedupe key)', async () => {
    const to = `dedupe-${randomUUID().slice(0, 8)}@racer.test`
    const mail = { kind: 'new_message' as const, recipientName: 'A', senderName: 'B', title: 'T', excerpt: 'x', link: 'http://127.0.0.1/x' }
    await enqueueMail(db, to, mail, `dedupe:${to}`)
    await enqueueMail(db, to, mail, `dedupe:${to}`)
    expect(await rowsFor(to)).toHaveLength(1)
    await db.delete(schema.mailOutbox).where(eq(schema.mailOutbox.toAddress, to))
  })

  it('lets two drainers at once send each mail exactly once', async () => {
    const to = await queue(6)
    const sent: OutgoingMail[] = []
    const send = async (m: OutgoingMail) => {
      sent.push(m)
      await new Promise(r => setTimeout(r, 20))
    }
    await Promise.all([drainOutbox(db, send, { now: FAR }), drainOutbox(db, send, { now: FAR })])
    const ours = sent.filter(m => m.to === to).map(m => m.subject)
    expect(ours).toHaveLength(6)
    expect(new Set(ours).size).toBe(6)
    const rows = await rowsFor(to)
    expect(rows.every(r => r.sentAt !== null)).toBe(true)
  })

  it('stops after the last attempt and keeps the mail with its error for a person to see', async () => {
    const to = await queue(1)
    let now = FAR.getTime()
    for (let i = 0; i < MAX_ATTEMPTS + 2; i++) {
      await drainOutbox(db, async () => {
        throw new Error('421 service not available')
      }, { now: new Date(now) })
      now += 2 * 60 * 60_000
    }
    const [row] = await rowsFor(to)
    expect(row!.attempts).toBe(MAX_ATTEMPTS)
    expect(row!.sentAt).toBeNull()
    expect(row!.lastError).toBe('421 service not available')
    await db.delete(schema.mailOutbox).where(inArray(schema.mailOutbox.id, [row!.id]))
  })

  it('counts the attempt when it claims a mail, before sending; records sentAt after', async () => {
    const to = await queue(1)
    const seen: { attempts: number, sentAt: Date | null, lastError: string | null }[] = []
    const result = await drainOutbox(db, async (mail) => {
      if (mail.to === to) {
        const [row] = await rowsFor(mail.to)
        seen.push({ attempts: row!.attempts, sentAt: row!.sentAt, lastError: row!.lastError })
      }
      await smtp(inject('mailSmtpPort'))(mail)
    }, { now: FAR })
    expect(result.sent).toBeGreaterThanOrEqual(1)
    // While it was being sent, the row already said so: a crash here leaves a counted attempt and this note.
    expect(seen).toEqual([{ attempts: 1, sentAt: null, lastError: CLAIMED_NOTE }])
    const [row] = await rowsFor(to)
    expect(row!.attempts).toBe(1)
    expect(row!.sentAt).not.toBeNull()
    expect(row!.lastError).toBeNull()
  })

  it('sends each mail with a stable Message-ID, and a re-send of the same row carries the same one', async () => {
    const to = await queue(1)
    const host = 'mail.torquewright.test'
    await drainOutbox(db, smtp(inject('mailSmtpPort')), { now: FAR, host })
    const [row] = await rowsFor(to)
    const expected = outboxMessageId(row!, host)
    // RFC 5322 section 3.6.4: msg-id = "<" id-left "@" id-right ">"
    expect(expected).toMatch(new RegExp(`^<outbox-${row!.id}\\.[0-9a-f]{16}@mail\\.torquewright\\.test>$`))
    const first = await mailFor(to)
    expect(first.map(m => m.messageId)).toEqual([expected])
    // The sent mark lost (a crash between the send and the record): the row is due again and goes out again.
    await db.update(schema.mailOutbox).set({ sentAt: null, nextAttemptAt: FAR }).where(eq(schema.mailOutbox.id, row!.id))
    await drainOutbox(db, smtp(inject('mailSmtpPort')), { now: FAR, host })
    const both = await mailFor(to)
    expect(both).toHaveLength(2)
    expect(both.map(m => m.messageId)).toEqual([expected, expected])
    const [again] = await rowsFor(to)
    expect(again!.attempts).toBe(2)
    expect(again!.sentAt).not.toBeNull()
  })

  it('goes out from the app\'s own drainer with its row\'s Message-ID (server/utils/mail.ts hands it to nodemailer)', async () => {
    const to = `outbox-app-${randomUUID().slice(0, 8)}@racer.test`
    await enqueueMail(db, to, { kind: 'new_message', recipientName: 'Test', senderName: 'Shop', title: 'From the app', excerpt: 'Sent by the app', link: 'http://127.0.0.1/x' }, `test:${to}`)
    const [caught] = await eventually(`the app's mail to ${to}`, async () => {
      const mails = await mailFor(to)
      return mails.length > 0 ? mails : undefined
    }, 30_000)
    const [row] = await rowsFor(to)
    // The test app's site address is http://127.0.0.1:<port> (scripts/lib/app.ts), so its host names the Message-ID.
    expect(caught!.messageId).toBe(outboxMessageId(row!, '127.0.0.1'))
    expect(row!.attempts).toBe(1)
  })
})
