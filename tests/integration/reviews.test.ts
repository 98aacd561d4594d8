import { and, count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { pastDeal } from '../../scripts/lib/seed-reviews'
import { createRequest } from '../../server/services/deals'
import { postMessage } from '../../server/services/messages'
import { computeShopDeals } from '../../server/services/track-record'
import { combinedScore, recordScore } from '../../shared/reviews/track-record'
import { type CookieJar, makeAccount, PERSONAS, signedIn } from '../support/auth'
import { api } from '../support/context'
import { PEOPLE, actorByEmail, dealHttp, dealTestContext, makeOrder, requestInput, schema, signedInParties, type DealParty } from '../support/deals'

let t: Awaited<ReturnType<typeof dealTestContext>>
let jars: Record<DealParty, CookieJar>
let admin: CookieJar
const http = dealHttp()
const patch = (path: string, body: unknown, who: CookieJar) => api(path, { method: 'PATCH', headers: { 'content-type': 'application/json', 'cookie': who.header() }, body: JSON.stringify(body) })
const DAY = 86_400_000

beforeAll(async () => {
  t = await dealTestContext()
  jars = await signedInParties()
  admin = await signedIn(PERSONAS.admin)
})
afterAll(async () => {
  await t.close()
})

const reviewCount = async (orderId: number) => (await t.db.select({ n: count() }).from(schema.reviews).where(eq(schema.reviews.orderId, orderId)))[0]!.n
const good = { rating: 4, aspects: { communication: 5, keptToQuote: 4, powerVsTarget: null, finishAndPaperwork: 4 }, body: 'Clear answers all along and the invoices matched the quote.' }

/** An order between the seeded racer and shop, finished as its milestones would be: all released. */
async function completedOrder(request: Parameters<typeof requestInput>[0] = {}) {
  const order = await makeOrder(t.ctx, { request })
  await pastDeal(t.db, {
    requestId: order.requestId, orderId: order.orderId, shopUserId: order.shop.id, at: new Date(Date.now() - 100 * DAY), quoteAfterH: 5, orderStatus: 'completed',
    milestones: [{ dueDay: 10, submittedDay: 9, state: 'released' }, { dueDay: 40, submittedDay: 40, state: 'released' }, { dueDay: 70, submittedDay: 71, state: 'released' }],
  })
  return order
}

describe('writing a review', () => {
  it('is for the racer of a completed order, once; the shop, strangers and an open order are refused with nothing written', async () => {
    const open = await makeOrder(t.ctx)
    const early = await http.post(`/api/orders/${open.orderId}/review`, good, jars.racer)
    expect(early.status).toBe(409)
    expect(early.body.message).toContain('not complete')
    expect(await reviewCount(open.orderId)).toBe(0)

    const done = await completedOrder()
    expect((await http.post(`/api/orders/${done.orderId}/review`, good, jars.otherRacer)).status).toBe(404)
    expect((await http.post(`/api/orders/${done.orderId}/review`, good, jars.otherShop)).status).toBe(404)
    expect((await http.post(`/api/orders/${done.orderId}/review`, good, jars.shop)).status).toBe(403)
    expect((await http.post(`/api/orders/${done.orderId}/review`, good, admin)).status).toBe(403)
    const bad = await http.post(`/api/orders/${done.orderId}/review`, { ...good, rating: 6, body: 'short' }, jars.racer)
    expect(bad.status).toBe(400)
    expect(await reviewCount(done.orderId)).toBe(0)

    const first = await http.post(`/api/orders/${done.orderId}/review`, good, jars.racer)
    expect(first.status).toBe(201)
    const again = await http.post(`/api/orders/${done.orderId}/review`, { ...good, rating: 1 }, jars.racer)
    expect(again.status).toBe(409)
    expect(await reviewCount(done.orderId)).toBe(1)
    const [row] = await t.db.select().from(schema.reviews).where(eq(schema.reviews.orderId, done.orderId))
    expect(row!.rating).toBe(4)
    expect(row!.aspects).toEqual(good.aspects)

    const seen = await http.get(`/api/orders/${done.orderId}/review`, jars.racer)
    expect(seen.body.review.id).toBe(first.body.id)
    expect(seen.body.canReview).toBe(false)
  })

  it('is shown on the shop\'s page and on the build the request came from', async () => {
    const [build] = await t.db.select({ id: schema.builds.id, slug: schema.builds.slug }).from(schema.builds)
      .where(and(eq(schema.builds.shopId, (await actorByEmail(t.db, PEOPLE.shop)).shopId!), eq(schema.builds.status, 'published'))).limit(1)
    const done = await completedOrder({ build: build!.slug })
    const body = `From the build page: the heads flowed what the build said (${done.orderId}).`
    const res = await http.post(`/api/orders/${done.orderId}/review`, { ...good, body }, jars.racer)
    expect(res.status).toBe(201)
    const onBuild = await api(`/api/builds/${build!.slug}/reviews`)
    expect(onBuild.body.reviews.map((r: { body: string }) => r.body)).toContain(body)
    const onShop = await api(`/api/builders/${PEOPLE.shopSlug}/reviews`)
    const mine = onShop.body.reviews.find((r: { id: number }) => r.id === res.body.id)
    expect(mine.build.slug).toBe(build!.slug)
    expect(mine.author).toBe('Jonah')
  })

  it('keeps the replaced version on an edit within 14 days, and refuses one after', async () => {
    const done = await completedOrder()
    const { body: { id } } = await http.post(`/api/orders/${done.orderId}/review`, good, jars.racer)
    expect((await patch(`/api/reviews/${id}`, { ...good, rating: 2, body: 'Changed my mind after the first race weekend: a leak.' }, jars.otherRacer)).status).toBe(403)
    const edited = await patch(`/api/reviews/${id}`, { ...good, rating: 2, body: 'Changed my mind after the first race weekend: a leak.' }, jars.racer)
    expect(edited.status).toBe(200)
    const history = await t.db.select().from(schema.reviewEdits).where(eq(schema.reviewEdits.reviewId, id))
    expect(history.map(h => [h.rating, h.body])).toEqual([[4, good.body]])
    await t.db.update(schema.reviews).set({ createdAt: new Date(Date.now() - 15 * DAY) }).where(eq(schema.reviews.id, id))
    const late = await patch(`/api/reviews/${id}`, { ...good, rating: 5 }, jars.racer)
    expect(late.status).toBe(409)
    const [row] = await t.db.select().from(schema.reviews).where(eq(schema.reviews.id, id))
    expect(row!.rating).toBe(2)
    expect((await t.db.select().from(schema.reviewEdits).where(eq(schema.reviewEdits.reviewId, id))).length).toBe(1)
  })
})

describe('the shop\'s answer and hiding', () => {
  it('lets the reviewed shop answer once, publicly; no one else answers', async () => {
    const done = await completedOrder()
    const { body: { id } } = await http.post(`/api/orders/${done.orderId}/review`, good, jars.racer)
    expect((await http.post(`/api/reviews/${id}/answer`, { body: 'Not ours to answer.' }, jars.otherShop)).status).toBe(403)
    expect((await http.post(`/api/reviews/${id}/answer`, { body: 'The racer answering.' }, jars.racer)).status).toBe(403)
    expect((await http.post(`/api/reviews/${id}/answer`, { body: '' }, jars.shop)).status).toBe(400)
    const answer = `Thanks, it was a good build to do (${id}).`
    expect((await http.post(`/api/reviews/${id}/answer`, { body: answer }, jars.shop)).status).toBe(200)
    const second = await http.post(`/api/reviews/${id}/answer`, { body: 'A second answer.' }, jars.shop)
    expect(second.status).toBe(409)
    const shown = (await api(`/api/builders/${PEOPLE.shopSlug}/reviews`)).body.reviews.find((r: { id: number }) => r.id === id)
    expect(shown.answer.body).toBe(answer)
  })

  it('lets an admin hide a review with a reason, in one audit row; the public lists leave it out', async () => {
    const done = await completedOrder()
    const { body: { id } } = await http.post(`/api/orders/${done.orderId}/review`, good, jars.racer)
    const audits = async () => (await t.db.select().from(schema.auditLog).where(and(eq(schema.auditLog.entityType, 'review'), eq(schema.auditLog.entityId, id))))
    expect((await http.post(`/api/admin/reviews/${id}/hide`, { reason: 'short' }, admin)).status).toBe(400)
    expect((await http.post(`/api/admin/reviews/${id}/hide`, { reason: 'Names a person who is not a party.' }, jars.shop)).status).toBe(403)
    expect(await audits()).toEqual([])
    const before = (await api(`/api/builders/${PEOPLE.shopSlug}/reviews`)).body
    const reason = 'It names a mechanic who is not a party to the deal.'
    expect((await http.post(`/api/admin/reviews/${id}/hide`, { reason }, admin)).status).toBe(200)
    const rows = await audits()
    expect(rows.map(r => [r.action, r.note])).toEqual([['review.hide', reason]])
    const after = (await api(`/api/builders/${PEOPLE.shopSlug}/reviews`)).body
    expect(after.reviews.map((r: { id: number }) => r.id)).not.toContain(id)
    expect(after.hiddenCount).toBe(before.hiddenCount + 1)
    expect((await http.post(`/api/admin/reviews/${id}/hide`, { reason }, admin)).status).toBe(409)
    expect((await audits()).length).toBe(1)
  })

  it('gives no average below three reviews and says so', async () => {
    const owner = await makeAccount({ role: 'builder' })
    const shop = await actorByEmail(t.db, owner.email)
    const racer = await actorByEmail(t.db, PEOPLE.racer)
    const ratings = [5, 2, 4]
    for (const [i, rating] of ratings.entries()) {
      const order = await makeOrder(t.ctx, { shop: shop, racer, request: { shop: owner.shopSlug! } })
      await pastDeal(t.db, { requestId: order.requestId, orderId: order.orderId, shopUserId: shop.id, at: new Date(Date.now() - 50 * DAY), quoteAfterH: 1, orderStatus: 'completed', milestones: [{ dueDay: 5, submittedDay: 5, state: 'released' }] })
      expect((await http.post(`/api/orders/${order.orderId}/review`, { ...good, rating }, jars.racer)).status).toBe(201)
      const { summary } = (await api(`/api/builders/${owner.shopSlug}/reviews`)).body
      expect(summary.count).toBe(i + 1)
      if (i < 2) {
        expect(summary.average).toBeNull()
        expect(summary.text).toContain('fewer than 3')
      }
      else {
        // (5 + 2 + 4) / 3 = 3.67, shown to one decimal.
        expect(summary.average).toBe(3.7)
      }
    }
  })
})

describe('the track record, against a hand-counted fixture of deals', () => {
  let slug: string
  let shopId: number
  let owner: Awaited<ReturnType<typeof actorByEmail>>

  beforeAll(async () => {
    const account = await makeAccount({ role: 'builder' })
    slug = account.shopSlug!
    owner = await actorByEmail(t.db, account.email)
    shopId = owner.shopId!
    const racer = await actorByEmail(t.db, PEOPLE.racer)
    const open = (title: string) => makeOrder(t.ctx, { shop: owner, racer, request: { shop: slug, title } })
    const at = (daysAgo: number) => new Date(Date.now() - daysAgo * DAY)
    // A: first reply after 2 h, quote after 10 h; milestones on time (day 9 of 10), on time (day 30 of 30), late (63 of 60) with the guarantee met.
    const a = await open('Fixture A')
    await postMessage(t.ctx, owner, a.requestId, { body: 'Which class rules apply?', attachmentIds: [] })
    await pastDeal(t.db, { requestId: a.requestId, orderId: a.orderId, shopUserId: owner.id, at: at(300), replyAfterH: 2, quoteAfterH: 10, orderStatus: 'completed', milestones: [
      { dueDay: 10, submittedDay: 9, state: 'released' }, { dueDay: 30, submittedDay: 30, state: 'released' }, { dueDay: 60, submittedDay: 63, state: 'released', pull: { peakHp: 610, minimumHp: 588 } },
    ] })
    // B: quote after 40 h; late (12 of 10); on time (18 of 30) then disputed and released; the guarantee missed (570 < 588), disputed and refunded.
    const b = await open('Fixture B')
    await pastDeal(t.db, { requestId: b.requestId, orderId: b.orderId, shopUserId: owner.id, at: at(200), quoteAfterH: 40, orderStatus: 'completed', milestones: [
      { dueDay: 10, submittedDay: 12, state: 'released' }, { dueDay: 30, submittedDay: 18, disputedDay: 20, state: 'released' }, { dueDay: 60, submittedDay: null, disputedDay: 70, state: 'refunded', pull: { peakHp: 570, minimumHp: 588 } },
    ] })
    // C: quote after 4 h; on time (5 of 10), disputed and refunded; the order cancelled.
    const c = await open('Fixture C')
    await pastDeal(t.db, { requestId: c.requestId, orderId: c.orderId, shopUserId: owner.id, at: at(100), quoteAfterH: 4, orderStatus: 'cancelled', milestones: [
      { dueDay: 10, submittedDay: 5, disputedDay: 7, state: 'refunded' },
    ] })
    // D: a request the shop never answered.
    await createRequest(t.ctx, racer, requestInput({ shop: slug, title: 'Fixture D' }))
  })

  const expected = {
    orders: { completed: 2, active: 0, cancelled: 1, total: 3 },
    // Submitted: A 3 (2 on time), B 2 (1 on time), C 1 (on time) = 4 of 6.
    onTime: { onTime: 4, submitted: 6, sharePct: 66.7 },
    guarantees: { met: 1, missed: 1, counted: 2, sharePct: 50 },
    // B's second (released), B's third and C's first (refunded); orders B and C lost one.
    disputes: { opened: 3, refunded: 2, released: 1, open: 0, ordersWithLoss: 2 },
    // Replies 2 h (A's message before its quote), 40 h, 4 h: median 4 h over 3 of 4 requests.
    firstReply: { medianHours: 4, answered: 3, requests: 4 },
    // Quotes 10 h, 40 h, 4 h: median 10 h.
    quoteTime: { medianHours: 10, quoted: 3, requests: 4 },
  }

  it('counts every figure as by hand', async () => {
    const computed = (await computeShopDeals(t.db, [shopId])).get(shopId)!
    expect(computed.record).toEqual(expected)
  })

  it('answers the same over HTTP, and each figure lists what it counts, anonymised for others and named for the parties', async () => {
    const res = await api(`/api/builders/${slug}/record`)
    expect(res.status).toBe(200)
    expect(res.body.record).toEqual(expected)
    expect(res.body.recordScore).toBe(recordScore(expected))

    const stranger = await api(`/api/builders/${slug}/record/disputes`)
    expect(stranger.body.items.map((i: { outcome: string }) => i.outcome).sort()).toEqual(['ended: refunded to the racer', 'ended: refunded to the racer', 'ended: released to the shop'])
    for (const item of stranger.body.items) expect(Object.keys(item).sort()).toEqual(['deal', 'month', 'outcome'])
    expect(JSON.stringify(stranger.body)).not.toMatch(/Fixture|Jonah|cents/i)

    const onTime = await http.get(`/api/builders/${slug}/record/on-time`, jars.racer)
    expect(onTime.body.items).toHaveLength(6)
    expect(onTime.body.items.filter((i: { outcome: string }) => i.outcome.includes('late')).map((i: { outcome: string }) => i.outcome).sort()).toEqual(['2 days late', '3 days late'])
    expect(onTime.body.items.every((i: { title?: string, link?: string }) => i.title?.startsWith('Fixture') && i.link?.startsWith('/deals/orders/'))).toBe(true)
  })

  it('is recomputed when a deal changes state', async () => {
    const before = (await api(`/api/builders/${slug}/record`)).body.record
    const racer = await actorByEmail(t.db, PEOPLE.racer)
    const e = await makeOrder(t.ctx, { shop: owner, racer, request: { shop: slug, title: 'Fixture E' } })
    await pastDeal(t.db, { requestId: e.requestId, orderId: e.orderId, shopUserId: owner.id, at: new Date(Date.now() - 20 * DAY), quoteAfterH: 6, orderStatus: 'completed', milestones: [{ dueDay: 10, submittedDay: 10, state: 'released' }] })
    const after = (await api(`/api/builders/${slug}/record`)).body.record
    expect(after.orders.completed).toBe(before.orders.completed + 1)
    expect(after.onTime).toEqual({ onTime: 5, submitted: 7, sharePct: 71.4 })
  })
})

describe('GET /api/builders/for-target with the record', () => {
  it('puts the record in the score as it explains, and sorts by the record when asked', async () => {
    // The power target with the most proven shops among the seeded builds, over every displacement.
    const tries = await Promise.all([400, 500, 600, 700, 800, 900, 1000].map(hp => api(`/api/builders/for-target?ciMin=1&ciMax=2000&hp=${hp}&limit=50`)))
    const res = tries.reduce((a, b) => (b.body.shops.length > a.body.shops.length ? b : a))
    const hp = res.body.target.hp
    expect(res.status).toBe(200)
    expect(res.body.scoreExplained).toContain('0.75 × proof + 0.25 × record')
    expect(res.body.shops.length).toBeGreaterThan(1)
    for (const s of res.body.shops) expect(s.score).toBe(combinedScore(s.proofScore, recordScore(s.record)))
    const byRecord = await api(`/api/builders/for-target?ciMin=1&ciMax=2000&hp=${hp}&limit=50&sort=record`)
    const scores = byRecord.body.shops.map((s: { recordScore: number }) => s.recordScore)
    expect(scores).toEqual([...scores].sort((x: number, y: number) => y - x))
    const filtered = await api(`/api/builders/for-target?ciMin=1&ciMax=2000&hp=${hp}&limit=50&minCompleted=1`)
    expect(res.body.shops.some((s: { record: { orders: { completed: number } } }) => s.record.orders.completed === 0)).toBe(true)
    expect(filtered.body.shops.length).toBeLessThan(res.body.shops.length)
    expect(filtered.body.shops.every((s: { record: { orders: { completed: number } } }) => s.record.orders.completed >= 1)).toBe(true)
    expect((await api('/api/builders/for-target?ci=427&hp=700&sort=best')).status).toBe(400)
  })
})
