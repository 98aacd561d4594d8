// Writes to one deal at the same moment, over HTTP against the built app and the real MariaDB: many
// messages on one thread, both parties at once, and state changes that post a note to the thread
// (a webhook, a submission, an approval) while the parties write. Every write answers success and
// lands exactly once; none is lost to a deadlock.
import { randomUUID } from 'node:crypto'
import { and, eq } from 'drizzle-orm'
import Stripe from 'stripe'
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest'
import type { DealContext } from '../../server/services/deal-context'
import { createRequest } from '../../server/services/deals'
import { approveMilestone, submitMilestone } from '../../server/services/milestones'
import { startCheckout } from '../../server/services/payments'
import { type CookieJar, freshAddress, json, signedIn } from '../support/auth'
import { api } from '../support/context'
import { PEOPLE, actorByEmail, dealTestContext, fundMilestone, makeOrder, milestoneRow, requestInput, schema } from '../support/deals'
import { CARDS, payOnFakePage } from '../support/payments'

let ctx: DealContext
let close: () => Promise<void>
let racerJar: CookieJar
let shopJar: CookieJar
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
  racerJar = await signedIn(PEOPLE.racer)
  shopJar = await signedIn(PEOPLE.shop)
})
afterEach(async () => {
  await fake('/_fake/webhooks/release', 'POST')
})
afterAll(async () => {
  await close()
})

const fake = (path: string, method = 'GET') => fetch(`${inject('paymentsUrl')}${path}`, { method }).then(r => r.json())
const say = (requestId: number, body: string, who: CookieJar) => api(`/api/requests/${requestId}/messages`, json('POST', { body, attachmentIds: [] }, who, freshAddress()))
const thread = (requestId: number) => ctx.db.select().from(schema.requestMessages).where(eq(schema.requestMessages.requestId, requestId))
const messagesOf = async (requestId: number) => (await thread(requestId)).filter(m => m.kind === 'message').map(m => m.body)
const sorted = (list: string[]) => [...list].sort()

describe('messages at the same moment', () => {
  it('takes 10 parallel posts by one racer: all 201, each message stored exactly once', async () => {
    const racer = await actorByEmail(ctx.db, PEOPLE.racer)
    const { id } = await createRequest(ctx, racer, requestInput({ title: `Ten at once ${randomUUID().slice(0, 6)}` }))
    const bodies = Array.from({ length: 10 }, (_, i) => `Parallel question ${i + 1} about the cam card`)
    const answers = await Promise.all(bodies.map(body => say(id, body, racerJar)))
    expect(answers.map(a => a.status)).toEqual(bodies.map(() => 201))
    expect(sorted(answers.map(a => a.body.body as string))).toEqual(sorted(bodies))
    expect(sorted(await messagesOf(id))).toEqual(sorted(bodies))
  })

  it('takes a racer and its shop posting at the same moment, 10 rounds: all 201, all stored', async () => {
    const racer = await actorByEmail(ctx.db, PEOPLE.racer)
    const { id } = await createRequest(ctx, racer, requestInput({ title: `Both sides ${randomUUID().slice(0, 6)}` }))
    const sent: string[] = []
    const statuses: number[] = []
    for (let round = 1; round <= 10; round++) {
      const mine = `Racer, round ${round}: is the block decked yet?`
      const theirs = `Shop, round ${round}: the block goes to the machinist on Monday.`
      sent.push(mine, theirs)
      const answers = await Promise.all([say(id, mine, racerJar), say(id, theirs, shopJar)])
      statuses.push(...answers.map(a => a.status))
    }
    expect(statuses).toEqual(sent.map(() => 201))
    expect(sorted(await messagesOf(id))).toEqual(sorted(sent))
  })
})

/** A completed payment whose webhook the fake holds back, so the test sends it at the moment it chooses. */
async function heldCompletion() {
  const order = await makeOrder(ctx, { request: { title: `Racing a webhook ${randomUUID().slice(0, 6)}` } })
  const m = order.milestones[0]!
  await fake('/_fake/webhooks/hold', 'POST')
  const { url, sessionId } = await startCheckout(ctx, order.racer, m.id)
  await payOnFakePage(url, CARDS.succeeds)
  const events = await fake('/_fake/events') as { id: string, type: string, objectId: string }[]
  const completed = events.find(e => e.type === 'checkout.session.completed' && e.objectId === sessionId)!
  const res = await fetch(`${inject('paymentsUrl')}/v1/events/${completed.id}`, { headers: { authorization: `Bearer ${inject('paymentsKeys').secretKey}` } })
  const payload = JSON.stringify(await res.json(), null, 2)
  return { ...order, m, payload }
}

/** The event delivered to the app's webhook route, signed as the fake signs it (the SDK's generateTestHeaderString). */
const deliver = (payload: string) => api('/api/webhooks/stripe', {
  method: 'POST',
  headers: { 'content-type': 'application/json', 'stripe-signature': Stripe.webhooks.generateTestHeaderString({ payload, secret: inject('paymentsKeys').webhookSecret }) },
  body: payload,
})

describe('state changes that post to the thread, while the parties write', () => {
  it('funds from a webhook while both parties post (5 rounds): the webhook 200, every message 201, the note and the messages stored once', async () => {
    for (let round = 1; round <= 5; round++) {
      const { m, requestId, payload } = await heldCompletion()
      const bodies = [`Racer ${round}a: paid just now.`, `Shop ${round}a: thanks, ordering parts.`, `Racer ${round}b: send the invoices.`, `Shop ${round}b: will do.`]
      const [hook, ...answers] = await Promise.all([
        deliver(payload),
        say(requestId, bodies[0]!, racerJar), say(requestId, bodies[1]!, shopJar), say(requestId, bodies[2]!, racerJar), say(requestId, bodies[3]!, shopJar),
      ])
      expect(hook.status).toBe(200)
      expect(hook.body.outcome).toBe(`milestone ${m.id} funded`)
      expect(answers.map(a => a.status)).toEqual([201, 201, 201, 201])
      expect((await milestoneRow(ctx.db, m.id)).state).toBe('funded')
      const rows = await thread(requestId)
      expect(sorted(rows.filter(r => r.kind === 'message').map(r => r.body))).toEqual(sorted(bodies))
      expect(rows.filter(r => r.kind === 'event' && r.body.startsWith(`The deposit for "${m.title}" was paid`))).toHaveLength(1)
    }
  })

  it('submits and approves (with the payout) while both parties post: every call succeeds and every note is stored once', async () => {
    const { racer, shop, milestones, requestId } = await makeOrder(ctx, { request: { title: `Racing transitions ${randomUUID().slice(0, 6)}` } })
    const m = milestones[0]!
    await fundMilestone(ctx, racer, m.id)
    const during = (label: string) => [
      say(requestId, `Racer during ${label} (1)`, racerJar), say(requestId, `Shop during ${label} (1)`, shopJar),
      say(requestId, `Racer during ${label} (2)`, racerJar), say(requestId, `Shop during ${label} (2)`, shopJar),
    ]
    const [submitted, ...first] = await Promise.all([
      submitMilestone(ctx, shop, m.id, { notes: 'Parts are on the bench; invoices attached.', proofFileIds: [], deliveryPullId: null }).then(() => 'ok'),
      ...during('submit'),
    ])
    expect(submitted).toBe('ok')
    const [approved, ...second] = await Promise.all([approveMilestone(ctx, racer, m.id), ...during('approve')])
    expect(approved).toEqual({ released: true, problem: null })
    expect([...first, ...second].map(a => (a as { status: number }).status)).toEqual(Array.from({ length: 8 }, () => 201))
    expect((await milestoneRow(ctx.db, m.id)).state).toBe('released')
    const rows = await thread(requestId)
    expect(rows.filter(r => r.kind === 'message' && r.body.includes(' during '))).toHaveLength(8)
    for (const note of [`"${m.title}" was submitted for approval.`, `"${m.title}" was approved.`, `"${m.title}" was paid out to the shop.`]) {
      expect(rows.filter(r => r.kind === 'event' && r.body === note)).toHaveLength(1)
    }
    const events = await ctx.db.select().from(schema.dealEvents).where(and(eq(schema.dealEvents.milestoneId, m.id), eq(schema.dealEvents.action, 'milestone_released')))
    expect(events).toHaveLength(1)
  })
})
