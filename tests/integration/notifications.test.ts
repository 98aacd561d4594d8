// The notifications page's routes: each party's deal events with a read mark, and the e-mail switches
// the outbox honours when a deal mail is queued. Fresh accounts throughout, so no other file's deals,
// marks or switches meet these.
import { randomBytes } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadActor, type DealActor, type DealContext } from '../../server/services/deal-context'
import { createRequest, sendQuote } from '../../server/services/deals'
import type { NotificationList } from '../../shared/types/notifications'
import { as, makeAccount, signIn, waitForMail, type CookieJar } from '../support/auth'
import { api, mailFor } from '../support/context'
import { dealTestContext, fundMilestone, makeOrder, quoteInput, requestInput, schema } from '../support/deals'

let ctx: DealContext
let close: () => Promise<void>
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
})
afterAll(async () => {
  await close()
})

interface Person { id: number, email: string, jar: CookieJar, actor: DealActor, shopSlug: string | null }

/** A fresh signed-in account of its own, with its deal actor. */
async function person(role: 'racer' | 'builder'): Promise<Person> {
  const account = await makeAccount({ role, name: `Notified ${role} ${randomBytes(2).toString('hex')}` })
  const { code, jar } = await signIn('password', { email: account.email, password: account.password })
  expect(code).toBeNull()
  const actor = await loadActor(ctx.db, account.id)
  return { id: account.id, email: account.email, jar, actor: actor!, shopSlug: account.shopSlug }
}

const address = '10.78.0.1'
function call(who: Person | null, method: string, path: string, body?: unknown) {
  const headers = as(who?.jar ?? null, address, body === undefined ? {} : { 'content-type': 'application/json' })
  return api(path, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
}
const list = async (who: Person, query = '') => {
  const res = await call(who, 'GET', `/api/me/notifications${query}`)
  expect(res.status).toBe(200)
  return res.body as NotificationList
}
const settingsRow = async (userId: number) =>
  (await ctx.db.select().from(schema.notificationSettings).where(eq(schema.notificationSettings.userId, userId)))[0] ?? null
const outboxTo = (email: string) => ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.toAddress, email))

/** A deal between a fresh racer and a fresh shop: request, quote, accepted order, first deposit paid. */
async function dealBetween(racer: Person, shop: Person) {
  const title = `Notified deal ${randomBytes(3).toString('hex')}`
  const order = await makeOrder(ctx, { racer: racer.actor, shop: shop.actor, request: { shop: shop.shopSlug!, title } })
  await fundMilestone(ctx, racer.actor, order.milestones[0]!.id)
  return { ...order, title }
}

describe('the notifications list', () => {
  let racer: Person
  let shop: Person
  let deal: Awaited<ReturnType<typeof dealBetween>>
  beforeAll(async () => {
    racer = await person('racer')
    shop = await person('builder')
    deal = await dealBetween(racer, shop)
  })

  it('shows the racer the shop\'s and the payment\'s events of their deal, not their own actions, newest first and all unread', async () => {
    const body = await list(racer)
    const actions = body.notifications.map(n => n.action)
    expect(actions).toEqual(['milestone_funded', 'quote_sent'])
    expect(body).toMatchObject({ total: 2, unread: 2, page: 1, perPage: 20 })
    expect(body.notifications.every(n => n.unread)).toBe(true)
    const [funded, quoted] = body.notifications
    expect(funded!.id).toBeGreaterThan(quoted!.id)
    expect(funded).toMatchObject({ words: 'Deposit paid', title: deal.title, link: `/deals/orders/${deal.orderId}` })
    // The quote was sent before there was an order: its link is the request's page.
    expect(quoted).toMatchObject({ words: 'Quote sent', title: deal.title, link: `/deals/requests/${deal.requestId}` })
    expect(Number.isNaN(Date.parse(funded!.createdAt))).toBe(false)
    expect(body.email).toEqual({ requests: true, messages: true, quotes: true, payments: true, milestones: true, reviews: true })
  })

  it('shows the shop the racer\'s events of the same deal', async () => {
    const body = await list(shop)
    expect(body.notifications.map(n => n.action)).toEqual(['milestone_funded', 'quote_accepted', 'request_sent'])
    expect(body.unread).toBe(3)
    expect(body.notifications.every(n => n.title === deal.title)).toBe(true)
    expect(body.notifications.find(n => n.action === 'request_sent')!.actorName).toBe(racer.actor.name)
  })

  it('shows a stranger none of them, and refuses an anonymous caller with 401', async () => {
    const stranger = await person('racer')
    const body = await list(stranger)
    expect(body).toMatchObject({ notifications: [], total: 0, unread: 0 })
    const mine = (await list(racer)).notifications.map(n => n.id)
    expect(mine.length).toBeGreaterThan(0)
    const anonymous = await call(null, 'GET', '/api/me/notifications')
    expect(anonymous.status).toBe(401)
    expect(JSON.stringify(anonymous.body)).not.toContain(deal.title)
  })

  it('pages through the list', async () => {
    const first = await list(shop, '?perPage=2')
    const second = await list(shop, '?perPage=2&page=2')
    expect(first.notifications.map(n => n.action)).toEqual(['milestone_funded', 'quote_accepted'])
    expect(second.notifications.map(n => n.action)).toEqual(['request_sent'])
    expect(second.total).toBe(3)
  })

  it('refuses a bad query with 400', async () => {
    for (const q of ['?perPage=0', '?perPage=101', '?page=0', '?page=two', '?perPage=1.5']) {
      const res = await call(racer, 'GET', `/api/me/notifications${q}`)
      expect(res.status, q).toBe(400)
    }
  })

  it('marks read up to an event, keeps the newer ones unread and first, then marks all read', async () => {
    const before = await list(shop)
    const oldest = before.notifications.at(-1)!
    const marked = await call(shop, 'POST', '/api/me/notifications/read', { upTo: oldest.id })
    expect(marked.status).toBe(200)
    expect(marked.body).toEqual({ unread: 2 })
    const after = await list(shop)
    expect(after.notifications.map(n => n.unread)).toEqual([true, true, false])
    expect(after.notifications.at(-1)!.id).toBe(oldest.id)

    // A mark never moves back.
    expect((await call(shop, 'POST', '/api/me/notifications/read', { upTo: 1 })).body).toEqual({ unread: 2 })

    const all = await call(shop, 'POST', '/api/me/notifications/read', { all: true })
    expect(all.body).toEqual({ unread: 0 })
    expect((await list(shop)).notifications.every(n => !n.unread)).toBe(true)
    expect((await settingsRow(shop.id))!.readUpToEventId).toBe(before.notifications[0]!.id)
    // The racer's own mark is untouched by the shop's.
    expect((await list(racer)).unread).toBe(2)
  })

  it('never marks read an event that has not happened yet', async () => {
    const res = await call(racer, 'POST', '/api/me/notifications/read', { upTo: 9_000_000_000 })
    expect(res.body).toEqual({ unread: 0 })
    // A second quote from the shop on a new request arrives after the mark: it is unread.
    const { id: requestId } = await createRequest(ctx, racer.actor, requestInput({ shop: shop.shopSlug!, title: `${deal.title} (second)` }))
    await sendQuote(ctx, shop.actor, requestId, quoteInput())
    const body = await list(racer)
    expect(body.unread).toBe(1)
    expect(body.notifications[0]).toMatchObject({ action: 'quote_sent', unread: true, link: `/deals/requests/${requestId}` })
    expect(body.notifications.slice(1).every(n => !n.unread)).toBe(true)
  })

  it('refuses bad bodies with 400 and writes nothing', async () => {
    const fresh = await person('racer')
    const bodies: [string, unknown][] = [
      ['/api/me/notifications/read', {}],
      ['/api/me/notifications/read', { all: false }],
      ['/api/me/notifications/read', { upTo: -1 }],
      ['/api/me/notifications/read', { upTo: 'latest' }],
      ['/api/me/notifications/read', { all: true, upTo: 3 }],
      ['/api/me/notifications/settings', {}],
      ['/api/me/notifications/settings', { email: {} }],
      ['/api/me/notifications/settings', { email: { quotes: 'off' } }],
      ['/api/me/notifications/settings', { email: { refunds: false } }],
      ['/api/me/notifications/settings', { email: { quotes: false }, extra: 1 }],
    ]
    for (const [path, body] of bodies) {
      const res = await call(fresh, path.endsWith('read') ? 'POST' : 'PATCH', path, body)
      expect(res.status, `${path} ${JSON.stringify(body)}`).toBe(400)
      expect(typeof res.body.message).toBe('string')
    }
    expect(await settingsRow(fresh.id)).toBeNull()
    const anonymous = await call(null, 'PATCH', '/api/me/notifications/settings', { email: { quotes: false } })
    expect(anonymous.status).toBe(401)
  })
})

describe('the e-mail switches', () => {
  it('a racer who turns off quote e-mail gets no quote mail, while the deposit mail still arrives; turned on again, it comes back', async () => {
    const racer = await person('racer')
    const shop = await person('builder')
    const off = await call(racer, 'PATCH', '/api/me/notifications/settings', { email: { quotes: false } })
    expect(off.status).toBe(200)
    expect(off.body).toEqual({ email: { requests: true, messages: true, quotes: false, payments: true, milestones: true, reviews: true } })
    expect((await list(racer)).email.quotes).toBe(false)

    const deal = await dealBetween(racer, shop)
    const deposit = await waitForMail(racer.email, m => m.subject.startsWith('Deposit received'), 20_000)
    expect(deposit.text).toContain(deal.milestones[0]!.title)
    // The shop switched nothing: its quote mail (the accepted quote) is queued.
    await waitForMail(shop.email, m => m.subject === `Quote accepted: ${deal.title}`, 20_000)
    const queued = await outboxTo(racer.email)
    expect(queued.map(m => m.subject).filter(s => s.includes('sent a quote'))).toEqual([])
    expect(queued.some(m => m.subject.startsWith('Deposit received'))).toBe(true)
    expect((await mailFor(racer.email)).filter(m => m.subject.includes('sent a quote'))).toEqual([])
    // The event itself is still listed.
    expect((await list(racer)).notifications.map(n => n.action)).toContain('quote_sent')

    const on = await call(racer, 'PATCH', '/api/me/notifications/settings', { email: { quotes: true } })
    expect(on.body.email.quotes).toBe(true)
    const { id: requestId } = await createRequest(ctx, racer.actor, requestInput({ shop: shop.shopSlug!, title: `${deal.title} (again)` }))
    await sendQuote(ctx, shop.actor, requestId, quoteInput())
    await waitForMail(racer.email, m => m.subject.includes('sent a quote'), 20_000)
  })

  it('a shop that turns off new-request e-mail gets none, and the switch is the shop\'s alone', async () => {
    const shop = await person('builder')
    const racer = await person('racer')
    expect((await call(shop, 'PATCH', '/api/me/notifications/settings', { email: { requests: false, messages: false } })).status).toBe(200)
    await dealBetween(racer, shop)
    await waitForMail(shop.email, m => m.subject.startsWith('Deposit received'), 20_000)
    expect((await outboxTo(shop.email)).filter(m => m.subject.startsWith('New quote request'))).toEqual([])
    // The racer's quote mail is unaffected by the shop's switches.
    await waitForMail(racer.email, m => m.subject.includes('sent a quote'), 20_000)
    expect((await list(shop)).email).toEqual({ requests: false, messages: false, quotes: true, payments: true, milestones: true, reviews: true })
  })
})
