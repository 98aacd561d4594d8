// A shop hears about a review: when a racer posts or edits one, the shop gets a notification and an
// e-mail through the outbox (read here from the real SMTP catcher), once per write, even when the write's
// transaction loses a lock conflict and runs again; a shop that switched review mail off gets the
// notification and no mail. Fresh accounts throughout, so no other file's deals or switches meet these.
import { randomBytes } from 'node:crypto'
import { and, eq, like } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { pastDeal } from '../../scripts/lib/seed-reviews'
import type { Database } from '../../server/database/types'
import { loadActor, type DealActor, type DealContext } from '../../server/services/deal-context'
import { createReview } from '../../server/services/reviews'
import type { NotificationList } from '../../shared/types/notifications'
import { as, makeAccount, signIn, waitForMail, type CookieJar } from '../support/auth'
import { api, mailFor } from '../support/context'
import { dealTestContext, makeOrder, schema } from '../support/deals'

let ctx: DealContext
let close: () => Promise<void>
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
})
afterAll(async () => {
  await close()
})

const DAY = 86_400_000
interface Person { id: number, email: string, jar: CookieJar, actor: DealActor, shopSlug: string | null }

async function person(role: 'racer' | 'builder'): Promise<Person> {
  const account = await makeAccount({ role, name: `Reviewing ${role} ${randomBytes(2).toString('hex')}` })
  const { code, jar } = await signIn('password', { email: account.email, password: account.password })
  expect(code).toBeNull()
  const actor = await loadActor(ctx.db, account.id)
  return { id: account.id, email: account.email, jar, actor: actor!, shopSlug: account.shopSlug }
}

const address = '10.79.0.1'
function call(who: Person, method: string, path: string, body?: unknown) {
  const headers = as(who.jar, address, body === undefined ? {} : { 'content-type': 'application/json' })
  return api(path, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
}

/** A completed order between a fresh racer and a fresh shop (every milestone released). */
async function completedOrder(racer: Person, shop: Person) {
  const title = `Finished deal ${randomBytes(3).toString('hex')}`
  const order = await makeOrder(ctx, { racer: racer.actor, shop: shop.actor, request: { shop: shop.shopSlug!, title } })
  await pastDeal(ctx.db, {
    requestId: order.requestId, orderId: order.orderId, shopUserId: shop.id, at: new Date(Date.now() - 100 * DAY), quoteAfterH: 5, orderStatus: 'completed',
    milestones: [{ dueDay: 10, submittedDay: 9, state: 'released' }, { dueDay: 40, submittedDay: 40, state: 'released' }, { dueDay: 70, submittedDay: 71, state: 'released' }],
  })
  return { ...order, title }
}

const isReviewMail = (m: { subject: string }) => m.subject.startsWith('New review') || m.subject.startsWith('Review edited')
const review = (rating: number, body: string) => ({ rating, aspects: { communication: rating, keptToQuote: rating, powerVsTarget: null, finishAndPaperwork: rating }, body })
const reviewMailsTo = (email: string) => ctx.db.select().from(schema.mailOutbox)
  .where(and(eq(schema.mailOutbox.toAddress, email), like(schema.mailOutbox.dedupeKey, 'review:%')))
const eventsOf = (orderId: number, action: string) => ctx.db.select().from(schema.dealEvents)
  .where(and(eq(schema.dealEvents.orderId, orderId), eq(schema.dealEvents.action, action)))
async function notifications(who: Person) {
  const res = await call(who, 'GET', '/api/me/notifications')
  expect(res.status).toBe(200)
  return res.body as NotificationList
}
/** Waits until the outbox has sent every review mail to the address (so the catcher holds all it will get). */
async function allSent(email: string) {
  await expect.poll(async () => (await reviewMailsTo(email)).every(m => m.sentAt !== null), { timeout: 20_000, interval: 200 }).toBe(true)
}

describe('a review reaches the shop', () => {
  it('a posted review: one notification and one e-mail with the rating and a link to the order', async () => {
    const racer = await person('racer')
    const shop = await person('builder')
    const deal = await completedOrder(racer, shop)
    const body = `Ran clean on the first fire-up and made the number (${deal.title}).`
    const posted = await call(racer, 'POST', `/api/orders/${deal.orderId}/review`, review(4, body))
    expect(posted.status).toBe(201)

    const list = await notifications(shop)
    const notice = list.notifications.find(n => n.action === 'review_posted')
    expect(notice).toMatchObject({ words: 'Review posted', detail: '4 of 5', title: deal.title, link: `/deals/orders/${deal.orderId}`, unread: true })
    // The racer's own action is not their notification.
    expect((await notifications(racer)).notifications.map(n => n.action)).not.toContain('review_posted')

    const mail = await waitForMail(shop.email, m => m.subject.startsWith('New review'), 20_000)
    expect(mail.subject).toContain('4 of 5')
    expect(mail.text).toContain('4 of 5')
    expect(mail.text).toContain(body)
    expect(mail.text).toContain(`/deals/orders/${deal.orderId}`)
    expect(mail.html).toContain(`/deals/orders/${deal.orderId}`)
    await allSent(shop.email)
    expect((await mailFor(shop.email)).filter(m => m.subject.startsWith('New review'))).toHaveLength(1)
    expect(await reviewMailsTo(shop.email)).toHaveLength(1)
    // The racer is not mailed about their own review.
    expect((await mailFor(racer.email)).filter(isReviewMail)).toEqual([])
  })

  it('an edit: one more notification and one more e-mail with the new rating', async () => {
    const racer = await person('racer')
    const shop = await person('builder')
    const deal = await completedOrder(racer, shop)
    const { body: { id } } = await call(racer, 'POST', `/api/orders/${deal.orderId}/review`, review(5, 'Everything as quoted, delivered on the day they said.'))
    await waitForMail(shop.email, m => m.subject.startsWith('New review'), 20_000)
    const edited = await call(racer, 'PATCH', `/api/reviews/${id}`, review(2, 'After the first race weekend the rear main seal leaked.'))
    expect(edited.status).toBe(200)

    const mail = await waitForMail(shop.email, m => m.subject.startsWith('Review edited'), 20_000)
    expect(mail.subject).toContain('2 of 5')
    expect(mail.text).toContain('rear main seal')
    expect(mail.text).toContain(`/deals/orders/${deal.orderId}`)
    expect((await notifications(shop)).notifications.filter(n => n.action.startsWith('review_')).map(n => [n.action, n.detail]))
      .toEqual([['review_edited', '2 of 5'], ['review_posted', '5 of 5']])
    await allSent(shop.email)
    expect((await mailFor(shop.email)).filter(m => m.subject.startsWith('Review edited'))).toHaveLength(1)
    expect(await reviewMailsTo(shop.email)).toHaveLength(2)
  })

  it('a shop that switched review e-mail off gets the notification and no mail; its other deal mail is untouched', async () => {
    const racer = await person('racer')
    const shop = await person('builder')
    const off = await call(shop, 'PATCH', '/api/me/notifications/settings', { email: { reviews: false } })
    expect(off.status).toBe(200)
    expect(off.body.email).toMatchObject({ reviews: false, quotes: true })
    const deal = await completedOrder(racer, shop)
    expect((await call(racer, 'POST', `/api/orders/${deal.orderId}/review`, review(3, 'Fair work, slow answers in the thread.'))).status).toBe(201)

    expect((await notifications(shop)).notifications.map(n => n.action)).toContain('review_posted')
    expect(await eventsOf(deal.orderId, 'review_posted')).toHaveLength(1)
    expect(await reviewMailsTo(shop.email)).toEqual([])
    // Its quote mail from the same deal still went out, so the drainer has run for this shop.
    await waitForMail(shop.email, m => m.subject === `Quote accepted: ${deal.title}`, 20_000)
    expect((await mailFor(shop.email)).filter(isReviewMail)).toEqual([])
  })

  it('exactly once when the review\'s transaction loses a lock conflict and runs again', async () => {
    const racer = await person('racer')
    const shop = await person('builder')
    const deal = await completedOrder(racer, shop)
    // The first run does all its writes, then is rolled back as MariaDB rolls back a deadlock victim
    // (ER_LOCK_DEADLOCK, errno 1213: MariaDB's error reference); the retry runs it again from the start.
    let runs = 0
    const flaky = Object.create(ctx.db) as Database
    flaky.transaction = (fn => ctx.db.transaction(async (tx) => {
      const result = await fn(tx)
      if (++runs === 1) throw Object.assign(new Error('Deadlock found when trying to get lock; try restarting transaction'), { errno: 1213, code: 'ER_LOCK_DEADLOCK' })
      return result
    })) as Database['transaction']
    const { id } = await createReview(flaky, racer.actor, deal.orderId, { ...review(4, 'Second run of the same write, one notice.'), showDeliveryPull: false }, { siteUrl: ctx.config.siteUrl })
    expect(runs).toBe(2)

    expect(await ctx.db.select({ id: schema.reviews.id }).from(schema.reviews).where(eq(schema.reviews.orderId, deal.orderId))).toEqual([{ id }])
    expect(await eventsOf(deal.orderId, 'review_posted')).toHaveLength(1)
    expect((await reviewMailsTo(shop.email)).map(m => m.dedupeKey)).toEqual([`review:${id}`])
    await waitForMail(shop.email, m => m.subject.startsWith('New review'), 20_000)
    await allSent(shop.email)
    expect((await mailFor(shop.email)).filter(m => m.subject.startsWith('New review'))).toHaveLength(1)
  })
})
