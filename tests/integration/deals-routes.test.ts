// The deal routes over HTTP as signed-in demo accounts: input is validated with messages a person can
// act on (and nothing is written), strangers are refused, and uploads are limited and sniffed.
import { count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { type CookieJar, as, freshAddress, signedIn } from '../support/auth'
import { api } from '../support/context'
import { PEOPLE, dealTestContext, dealHttp, signedInParties, fundMilestone, makeOrder, milestoneRow, quoteInput, requestInput, schema } from '../support/deals'
import { disputeMilestone } from '../../server/services/milestones'
import { CARDS, eventually, payOnFakePage } from '../support/payments'
import type { Database } from '../../server/database/types'

let db: Database
let close: () => Promise<void>
let jar: Awaited<ReturnType<typeof signedInParties>>
beforeAll(async () => {
  ({ db, close } = await dealTestContext())
  jar = await signedInParties()
})
afterAll(async () => {
  await close()
})

const address = freshAddress()
const { post, get } = dealHttp(address)
const rows = async (table: typeof schema.quoteRequests | typeof schema.quoteRevisions | typeof schema.requestMessages) => (await db.select({ n: count() }).from(table))[0]!.n

async function newRequest() {
  const res = await post('/api/requests', requestInput({ title: `Routes ${Math.random().toString(36).slice(2, 8)}` }), jar.racer)
  expect(res.status).toBe(201)
  return res.body.id as number
}

describe('requests', () => {
  it('creates a request for a racer and shows it to its two parties only', async () => {
    const id = await newRequest()
    expect((await get(`/api/requests/${id}`, jar.racer)).body).toMatchObject({ id, side: 'racer', status: 'open' })
    expect((await get(`/api/requests/${id}`, jar.shop)).body.side).toBe('builder')
    expect((await get(`/api/requests/${id}`, jar.otherShop)).status).toBe(404)
    expect((await get(`/api/requests/${id}`, jar.otherRacer)).status).toBe(404)
    expect((await get(`/api/requests/${id}/messages`, jar.otherRacer)).status).toBe(404)
  })

  it.each([
    ['a missing power target', { targetHp: undefined }, 'targetHp'],
    ['an automatic without a stall speed', { transmission: 'automatic', stallRpm: null }, 'stall speed'],
    ['a budget in fractional cents', { budgetMinCents: 100.5 }, 'whole number of cents'],
    ['an unknown correction standard', { targetStandard: 'BEST_CASE' }, 'correction standards'],
  ])('refuses %s with a 400 that says what to fix, writing nothing', async (_what, change, words) => {
    const before = await rows(schema.quoteRequests)
    const res = await post('/api/requests', { ...requestInput(), ...change }, jar.racer)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain(words)
    expect(await rows(schema.quoteRequests)).toBe(before)
  })

  it('carries a manual car\'s launch rpm to the shop, stored on the request', async () => {
    const res = await post('/api/requests', requestInput({ title: `Launch ${Math.random().toString(36).slice(2, 8)}`, transmission: 'manual', stallRpm: null, launchRpm: 3800, shiftRpm: 7200 }), jar.racer)
    expect(res.status).toBe(201)
    const [row] = await db.select({ launchRpm: schema.quoteRequests.launchRpm, stallRpm: schema.quoteRequests.stallRpm }).from(schema.quoteRequests).where(eq(schema.quoteRequests.id, res.body.id))
    expect(row).toEqual({ launchRpm: 3800, stallRpm: null })
    expect((await get(`/api/requests/${res.body.id}`, jar.shop)).body).toMatchObject({ transmission: 'manual', launchRpm: 3800, stallRpm: null })
  })

  it('refuses a launch rpm with an automatic (400, nothing written)', async () => {
    const before = await rows(schema.quoteRequests)
    const res = await post('/api/requests', { ...requestInput(), launchRpm: 3800 }, jar.racer)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain('converter stall speed is the launch')
    expect(await rows(schema.quoteRequests)).toBe(before)
  })

  it('refuses a request to a shop that does not exist (422) and a deadline in the past (422)', async () => {
    const before = await rows(schema.quoteRequests)
    expect((await post('/api/requests', requestInput({ shop: 'no-such-shop' }), jar.racer)).status).toBe(422)
    const past = await post('/api/requests', requestInput({ deadline: '2020-01-01' }), jar.racer)
    expect(past.status).toBe(422)
    expect(past.body.message).toContain('deadline')
    expect(await rows(schema.quoteRequests)).toBe(before)
  })
})

describe('quotes', () => {
  it('refuses milestones that do not add up to the total (422, naming both figures) and writes no revision', async () => {
    const id = await newRequest()
    const before = await rows(schema.quoteRevisions)
    const base = quoteInput()
    const off = { ...base, milestones: base.milestones.map((m, i) => (i === 0 ? { ...m, amountCents: m.amountCents + 1 } : m)) }
    const res = await post(`/api/requests/${id}/quote`, off, jar.shop)
    expect(res.status).toBe(422)
    expect(res.body.message).toBe('The milestones add up to $24,600.01 but the line items total $24,600.00: they must be equal, to the cent.')
    expect(await rows(schema.quoteRevisions)).toBe(before)
  })

  it.each([
    ['one line above $10,000,000.00 (price × quantity)', (q: ReturnType<typeof quoteInput>) => ({ ...q, lineItems: [{ ...q.lineItems[0]!, unitPriceCents: 600_000_000, quantity: 2 }] }), '$12,000,000.00'],
    ['lines that together pass $10,000,000.00', (q: ReturnType<typeof quoteInput>) => ({ ...q, lineItems: [{ ...q.lineItems[0]!, unitPriceCents: 999_999_999 }, { ...q.lineItems[1]!, unitPriceCents: 999_999_999 }] }), '$19,999,999.98'],
    ['milestones that together pass $10,000,000.00', (q: ReturnType<typeof quoteInput>) => ({ ...q, milestones: q.milestones.map(m => ({ ...m, amountCents: 999_999_999 })) }), '$29,999,999.97'],
  ])('refuses a quote with %s: 422 naming the limit, and writes nothing', async (_what, change, figure) => {
    const id = await newRequest()
    const before = { revisions: await rows(schema.quoteRevisions), quotes: (await db.select({ n: count() }).from(schema.quotes))[0]!.n }
    const res = await post(`/api/requests/${id}/quote`, change(quoteInput()), jar.shop)
    expect(res.status).toBe(422)
    expect(res.body.message).toContain('at most $10,000,000.00')
    expect(res.body.message).toContain(figure)
    expect(await rows(schema.quoteRevisions)).toBe(before.revisions)
    expect((await db.select({ n: count() }).from(schema.quotes))[0]!.n).toBe(before.quotes)
    expect((await db.select().from(schema.quotes).where(eq(schema.quotes.requestId, id)))).toHaveLength(0)
  })

  it('keeps every revision, and refuses to accept a revision that is no longer current (409)', async () => {
    const id = await newRequest()
    const first = await post(`/api/requests/${id}/quote`, quoteInput(), jar.shop)
    expect(first.status).toBe(201)
    const second = await post(`/api/requests/${id}/quote`, { ...quoteInput(), notes: 'Revised: customer supplies the crank.' }, jar.shop)
    expect(second.body.revision).toBe(2)
    const view = (await get(`/api/requests/${id}`, jar.racer)).body
    expect(view.quote.history.map((h: { revision: number }) => h.revision)).toEqual([2, 1])
    expect(view.quote.history[1].notes).toBe('Prices hold for 30 days.')
    const stale = await post(`/api/quotes/${view.quote.id}/accept`, { revision: 1 }, jar.racer)
    expect(stale.status).toBe(409)
    expect(stale.body.message).toContain('revision 2 is current')
    expect((await post(`/api/quotes/${view.quote.id}/accept`, { revision: 2 }, jar.shop)).status).toBe(403)
    const accepted = await post(`/api/quotes/${view.quote.id}/accept`, { revision: 2 }, jar.racer)
    expect(accepted.status).toBe(201)
    expect((await post(`/api/quotes/${view.quote.id}/accept`, { revision: 2 }, jar.racer)).status).toBe(409)
    const order = await get(`/api/orders/${accepted.body.orderId}`, jar.shop)
    expect(order.body.milestones).toHaveLength(3)
    expect((await get(`/api/orders/${accepted.body.orderId}`, jar.otherShop)).status).toBe(404)
    expect((await get(`/api/orders/${accepted.body.orderId}`, jar.otherRacer)).status).toBe(404)
  })
})

describe('paying over HTTP', () => {
  it('gives a double click one payment page, and shows the funded milestone with its Stripe ids to both sides', async () => {
    const id = await newRequest()
    const q = await post(`/api/requests/${id}/quote`, quoteInput(), jar.shop)
    const { orderId } = (await post(`/api/quotes/${q.body.quoteId}/accept`, { revision: 1 }, jar.racer)).body
    const order = (await get(`/api/orders/${orderId}`, jar.racer)).body
    const first = order.milestones[0]
    const clicks = await Promise.all([1, 2].map(() => post(`/api/milestones/${first.id}/checkout`, {}, jar.racer)))
    expect(clicks.map(c => c.status)).toEqual([200, 200])
    expect(clicks[0]!.body.url).toBe(clicks[1]!.body.url)
    expect((await post(`/api/milestones/${first.id}/checkout`, {}, jar.otherRacer)).status).toBe(404)
    await payOnFakePage(clicks[0]!.body.url, CARDS.succeeds)
    await eventually('funded', async () => (await milestoneRow(db, first.id)).state === 'funded')
    for (const who of [jar.racer, jar.shop]) {
      const seen = (await get(`/api/orders/${orderId}`, who)).body.milestones[0]
      expect(seen.state).toBe('funded')
      expect(seen.payments[0].stripeCheckoutSessionId).toMatch(/^cs_test_/)
      expect(seen.payments[0].stripePaymentIntentId).toMatch(/^pi_/)
    }
  })
})

describe('the admin\'s desk', () => {
  it('lists the orders with a disputed milestone, and only those', async () => {
    const { ctx, close: done } = await dealTestContext()
    try {
      const calm = await makeOrder(ctx)
      const heated = await makeOrder(ctx)
      await fundMilestone(ctx, heated.racer, heated.milestones[0]!.id)
      await disputeMilestone(ctx, heated.racer, heated.milestones[0]!.id, 'The parts list changed without a word.')
      const admin = await signedIn(PEOPLE.admin)
      const desk = (await get('/api/requests', admin)).body
      expect(desk.side).toBe('admin')
      const ids = desk.orders.map((o: { id: number }) => o.id)
      expect(ids).toContain(heated.orderId)
      expect(ids).not.toContain(calm.orderId)
      expect(desk.orders.find((o: { id: number }) => o.id === heated.orderId).nextMilestone.state).toBe('disputed')
    }
    finally {
      await done()
    }
  })
})

describe('attachments', () => {
  const pdf = Buffer.from('%PDF-1.4\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n')
  const upload = (bytes: Buffer, kind: string, who: CookieJar, name = 'rules.pdf') =>
    api(`/api/attachments?kind=${kind}&name=${name}`, { method: 'POST', headers: as(who, address, { 'content-type': 'application/octet-stream' }), body: new Uint8Array(bytes) })

  it('takes a sniffed PDF, attaches it to a message, and lets only the parties download it', async () => {
    const id = await newRequest()
    const file = await upload(pdf, 'attachment', jar.racer)
    expect(file.status).toBe(201)
    expect(file.body).toMatchObject({ name: 'rules.pdf', mime: 'application/pdf' })
    const msg = await post(`/api/requests/${id}/messages`, { body: 'The class rules.', attachmentIds: [file.body.id] }, jar.racer)
    expect(msg.status).toBe(201)
    expect(msg.body.attachments[0].id).toBe(file.body.id)
    const got = await api(`/api/attachments/${file.body.id}`, { headers: as(jar.shop, address) })
    expect(got.status).toBe(200)
    expect(got.headers.get('content-disposition')).toContain('attachment')
    expect((await api(`/api/attachments/${file.body.id}`, { headers: as(jar.otherShop, address) })).status).toBe(404)
    // Attached once: the same file cannot be attached again.
    expect((await post(`/api/requests/${id}/messages`, { body: 'again', attachmentIds: [file.body.id] }, jar.racer)).status).toBe(422)
  })

  it('refuses a file of the wrong kind (415) and one over the limit (413), storing nothing', async () => {
    const before = (await db.select({ n: count() }).from(schema.files))[0]!.n
    const binary = Buffer.from([0x4D, 0x5A, 0x90, 0x00, 0x03, 0x00, 0x00, 0x00, 0x04, 0x00])
    expect((await upload(binary, 'attachment', jar.racer, 'tool.exe')).status).toBe(415)
    expect((await upload(Buffer.alloc(3 * 1024 * 1024, 65), 'pull', jar.shop, 'pull.csv')).status).toBe(413)
    expect((await upload(pdf, 'sneaky', jar.racer)).status).toBe(400)
    expect((await db.select({ n: count() }).from(schema.files))[0]!.n).toBe(before)
  })

  it('counts unread messages for the navigation and clears them when the thread is opened', async () => {
    const before = (await get('/api/messages/unread', jar.shop)).body
    const id = await newRequest()
    await post(`/api/requests/${id}/messages`, { body: 'Is the block in stock?' }, jar.racer)
    const after = (await get('/api/messages/unread', jar.shop)).body
    expect(after.threads.find((t: { requestId: number }) => t.requestId === id).unread).toBe(2)
    expect(after.total).toBe(before.total + 2)
    await get(`/api/requests/${id}/messages`, jar.shop)
    expect((await get('/api/messages/unread', jar.shop)).body.threads.find((t: { requestId: number }) => t.requestId === id)).toBeUndefined()
    const [reads] = await db.select().from(schema.messageReads).where(eq(schema.messageReads.requestId, id))
    expect(reads).toBeDefined()
  })
})
