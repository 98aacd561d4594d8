// Threads and deal e-mails through the services, with the e-mails read back from the tests' mail
// catcher (sent by the built app's outbox drainer over SMTP).
import { randomUUID } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { DealContext } from '../../server/services/deal-context'
import { createRequest } from '../../server/services/deals'
import { postMessage, pollThread, threadMessages, unreadCounts } from '../../server/services/messages'
import { approveMilestone, cancelOrder, submitMilestone } from '../../server/services/milestones'
import { mailFor } from '../support/context'
import { PEOPLE, actorByEmail, dealTestContext, fundMilestone, makeOrder, quoteInput, requestInput, schema } from '../support/deals'
import { eventually } from '../support/payments'

let ctx: DealContext
let close: () => Promise<void>
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
})
afterAll(async () => {
  await close()
})

const statusOf = async (p: Promise<unknown>) => p.then(() => 200, (e: { statusCode?: number }) => e.statusCode ?? 500)
const mailWith = (to: string, subject: string) => eventually(`"${subject}" to ${to}`, async () => (await mailFor(to)).find(m => m.subject === subject))

describe('threads', () => {
  it('carries messages both ways, counts what is unread, and clears it when the thread is read', async () => {
    const racer = await actorByEmail(ctx.db, PEOPLE.racer)
    const shop = await actorByEmail(ctx.db, PEOPLE.shop)
    const { id } = await createRequest(ctx, racer, requestInput({ title: `Thread test ${randomUUID().slice(0, 6)}` }))
    const before = await unreadCounts(ctx.db, shop)
    const m1 = await postMessage(ctx, racer, id, { body: 'Can you keep the stock oil pan?', attachmentIds: [] })
    expect(m1).toMatchObject({ kind: 'message', mine: true, body: 'Can you keep the stock oil pan?' })
    const after = await unreadCounts(ctx.db, shop)
    // the "asked for a quote" note and the message
    expect(after.threads.find(t => t.requestId === id)?.unread).toBe(2)
    expect(after.total).toBe(before.total + 1) // the note was already counted before the message
    const polled = await pollThread(ctx, shop, id, 0)
    expect(polled.messages.map(m => m.body)).toContain('Can you keep the stock oil pan?')
    expect(polled.messages.find(m => m.id === m1.id)?.mine).toBe(false)
    expect((await unreadCounts(ctx.db, shop)).threads.find(t => t.requestId === id)).toBeUndefined()
    const reply = await postMessage(ctx, shop, id, { body: 'Yes, with a baffle kit.', attachmentIds: [] })
    const fromRacer = await pollThread(ctx, racer, id, m1.id)
    expect(fromRacer.messages.map(m => m.id)).toEqual([reply.id])
  })

  it('e-mails the other party about a new message only when they are not on the thread\'s page', async () => {
    const racer = await actorByEmail(ctx.db, PEOPLE.racer)
    const shop = await actorByEmail(ctx.db, PEOPLE.shop)
    const { id } = await createRequest(ctx, racer, requestInput({ title: `Presence ${randomUUID().slice(0, 6)}` }))
    const away = await postMessage(ctx, racer, id, { body: 'Sent while the shop is away.', attachmentIds: [] })
    await pollThread(ctx, shop, id, 0) // the shop opens the thread
    const present = await postMessage(ctx, racer, id, { body: 'Sent while the shop is reading.', attachmentIds: [] })
    const queued = async (messageId: number) => (await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.dedupeKey, `message:${messageId}`))).length
    expect(await queued(away.id)).toBe(1)
    expect(await queued(present.id)).toBe(0)
  })

  it('hides a thread from another racer and another shop (404), and refuses someone else\'s file as an attachment', async () => {
    const racer = await actorByEmail(ctx.db, PEOPLE.racer)
    const { id } = await createRequest(ctx, racer, requestInput())
    const otherRacer = await actorByEmail(ctx.db, PEOPLE.otherRacer)
    const otherShop = await actorByEmail(ctx.db, PEOPLE.otherShop)
    for (const stranger of [otherRacer, otherShop]) {
      expect(await statusOf(threadMessages(ctx.db, stranger, id))).toBe(404)
      expect(await statusOf(postMessage(ctx, stranger, id, { body: 'hi', attachmentIds: [] }))).toBe(404)
    }
    const [file] = await ctx.db.insert(schema.files).values({ ownerId: otherRacer.id, kind: 'attachment', mime: 'text/plain', sizeBytes: 1, sha256: '0'.repeat(64), storageKey: `tests/${randomUUID()}`, originalName: 'x.txt' }).$returningId()
    expect(await statusOf(postMessage(ctx, racer, id, { body: 'see file', attachmentIds: [file!.id] }))).toBe(422)
    const count = (await threadMessages(ctx.db, racer, id)).length
    expect(count).toBe(1)
  })
})

describe('deal e-mails (read from the mail catcher)', () => {
  it('sends each party its own wording for request, quote, acceptance, funding, submission, approval, release and refund', async () => {
    const tag = randomUUID().slice(0, 6)
    const title = `Road-course six ${tag}`
    const { racer, shop, milestones, requestId } = await makeOrder(ctx, {
      request: { title },
      quote: {
        milestones: quoteInput().milestones.map((m, i) => ({ ...m, title: `Stage ${i + 1} ${tag}` })),
      },
    })
    const [m1, m2] = milestones
    await fundMilestone(ctx, racer, m1!.id)
    await submitMilestone(ctx, shop, m1!.id, { notes: 'Parts are in.', proofFileIds: [], deliveryPullId: null })
    await approveMilestone(ctx, racer, m1!.id)
    await fundMilestone(ctx, racer, m2!.id)
    await cancelOrder(ctx, racer, (await ctx.db.select().from(schema.orders).where(eq(schema.orders.requestId, requestId)))[0]!.id, 'Season cancelled.')
    await postMessage(ctx, racer, requestId, { body: 'Thanks for understanding.', attachmentIds: [] })

    const shopRow = PEOPLE.shop
    const request = await mailWith(shopRow, `New quote request: ${title}`)
    expect(request.text).toContain(`asked you for a quote: "${title}"`)
    expect(request.text).toContain(`/deals/requests/${requestId}`)
    const quote = await mailWith(PEOPLE.racer, 'Harrow Creek Engine Works sent a quote: $24,600.00')
    expect(quote.html).toContain('Review the quote')
    const accepted = await mailWith(shopRow, `Quote accepted: ${title}`)
    expect(accepted.text).toContain('accepted your quote of $24,600.00')
    const fundedRacer = await mailWith(PEOPLE.racer, `Deposit received: Stage 1 ${tag}`)
    expect(fundedRacer.text).toContain('The deposit of $7,380.00')
    await mailWith(shopRow, `Deposit received: Stage 1 ${tag}`)
    const submitted = await mailWith(PEOPLE.racer, `Work submitted for approval: Stage 1 ${tag}`)
    expect(submitted.text).toContain('approved on its own after 7 days')
    await mailWith(shopRow, `Milestone approved: Stage 1 ${tag}`)
    const released = await mailWith(shopRow, `Payout sent: Stage 1 ${tag}`)
    expect(released.text).toContain('$7,011.00') // $7,380.00 less the $369.00 fee
    const refunded = await mailWith(PEOPLE.racer, `Refunded: Stage 2 ${tag}`)
    expect(refunded.text).toContain('$9,840.00')
    expect(refunded.text).toContain('Season cancelled.')
    const message = await mailWith(shopRow, `New message on "${title}"`)
    expect(message.text).toContain('Thanks for understanding.')
    for (const mail of [request, quote, released, refunded]) {
      expect(mail.html).toMatch(/^<!doctype html>/i)
      expect(mail.text).not.toContain('<')
    }
  })
})
