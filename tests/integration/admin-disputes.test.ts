// The admin's side of disputes over HTTP, against the real test database and the running payments
// fake: the list and the review, each decision changing exactly what it should with one audit row
// written with it, the note reaching both parties (outbox → SMTP catcher, and the thread), and
// refusals (not disputed, bad body, not an admin) that write nothing.
import { and, count, eq, like } from 'drizzle-orm'
import { createStorage } from 'unstorage'
import fsDriver from 'unstorage/drivers/fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_DEAL_TITLES, seedDemoDispute } from '../../scripts/lib/seed-deals'
import type { AdminOverview, DisputeList, DisputeReview } from '../../shared/types/admin'
import { adminOverview } from '../../server/services/admin-overview'
import type { DealContext } from '../../server/services/deal-context'
import { type CookieJar, as, freshAddress, json, signedIn, waitForMail } from '../support/auth'
import { api } from '../support/context'
import { testUploadsDir } from '../support/builds'
import { PEOPLE, actorByEmail, dealTestContext, fundMilestone, makeDispute, makeOrder, milestoneRow, schema } from '../support/deals'
import { eventually } from '../support/payments'

let ctx: DealContext
let close: () => Promise<void>
const jar: Record<'admin' | 'racer' | 'shop', CookieJar> = {} as never
const address = freshAddress()
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
  jar.admin = await signedIn(PEOPLE.admin)
  jar.racer = await signedIn(PEOPLE.racer)
  jar.shop = await signedIn(PEOPLE.shop)
})
afterAll(async () => {
  await close()
})

const get = (path: string, who: CookieJar) => api(path, { headers: as(who, address) })
const settle = (milestoneId: number, body: unknown, who: CookieJar = jar.admin) => api(`/api/admin/disputes/${milestoneId}/settle`, json('POST', body, who, address))

/** Everything a settlement could write about one milestone, to prove a refusal wrote none of it. */
async function footprint(milestoneId: number, requestId: number) {
  const m = await milestoneRow(ctx.db, milestoneId)
  const n = async (q: Promise<{ n: number }[]>) => (await q)[0]!.n
  return {
    state: m.state,
    audit: await n(ctx.db.select({ n: count() }).from(schema.auditLog).where(and(eq(schema.auditLog.entityType, 'milestone'), eq(schema.auditLog.entityId, milestoneId)))),
    payments: await n(ctx.db.select({ n: count() }).from(schema.payments).where(eq(schema.payments.milestoneId, milestoneId))),
    events: await n(ctx.db.select({ n: count() }).from(schema.dealEvents).where(eq(schema.dealEvents.milestoneId, milestoneId))),
    thread: await n(ctx.db.select({ n: count() }).from(schema.requestMessages).where(eq(schema.requestMessages.requestId, requestId))),
    mail: await n(ctx.db.select({ n: count() }).from(schema.mailOutbox).where(like(schema.mailOutbox.dedupeKey, `settled:${milestoneId}:%`))),
  }
}

// Settlement mail leaves through the outbox (drained every 2 s, 20 at a time) behind the deal mail
// of the earlier tests; on a loaded machine that can take longer than waitForMail's default.
const OUTBOX_WAIT_MS = 30_000

const auditFor = (milestoneId: number) => ctx.db.select().from(schema.auditLog)
  .where(and(eq(schema.auditLog.entityType, 'milestone'), eq(schema.auditLog.entityId, milestoneId)))

describe('the list and the review', () => {
  it('lists open disputes oldest first with the request, the parties, the amount and the reason', async () => {
    const first = await makeDispute(ctx)
    const second = await makeDispute(ctx)
    const res = await get('/api/admin/disputes', jar.admin)
    expect(res.status).toBe(200)
    const list = res.body as DisputeList
    const ids = list.open.map(d => d.milestoneId)
    expect(ids.indexOf(first.milestone.id)).toBeGreaterThanOrEqual(0)
    expect(ids.indexOf(first.milestone.id)).toBeLessThan(ids.indexOf(second.milestone.id))
    const times = list.open.map(d => Date.parse(d.disputedAt))
    expect(times).toEqual([...times].sort((a, b) => a - b))
    // Exactly the milestones in the disputed state, no more.
    const [{ n }] = await ctx.db.select({ n: count() }).from(schema.milestones).where(eq(schema.milestones.state, 'disputed')) as [{ n: number }]
    expect(list.open).toHaveLength(n)
    expect(list.open.find(d => d.milestoneId === first.milestone.id)).toMatchObject({
      orderId: first.orderId, requestId: first.requestId, title: first.title,
      racer: { id: first.racer.id, name: first.racer.name }, shop: { slug: PEOPLE.shopSlug },
      milestone: { title: first.milestone.title, amountCents: first.milestone.amountCents }, reason: first.reason,
      disputedAt: first.milestone.disputedAt!.toISOString(),
    })
  })

  it('shows one dispute with the proof, the payments with their Stripe ids, the other milestones and the whole thread', async () => {
    const d = await makeDispute(ctx)
    const res = await get(`/api/admin/disputes/${d.milestone.id}`, jar.admin)
    expect(res.status).toBe(200)
    const review = res.body as DisputeReview
    expect(review).toMatchObject({ milestoneId: d.milestone.id, state: 'disputed', reason: d.reason, settlement: null, parties: { racer: { email: PEOPLE.racer }, shop: { ownerEmail: PEOPLE.shop } } })
    const m = review.order.milestones.find(x => x.id === d.milestone.id)!
    expect(m.submissionNotes).toBe(d.notes)
    expect(m.proofs.map(p => p.name)).toEqual([d.proofName])
    expect(m.payments[0]).toMatchObject({ kind: 'checkout', status: 'succeeded', amountCents: d.milestone.amountCents })
    expect(m.payments[0]!.stripeCheckoutSessionId).toMatch(/^cs_test_/)
    expect(m.payments[0]!.stripePaymentIntentId).toMatch(/^pi_/)
    expect(review.order.milestones).toHaveLength(3)
    const bodies = review.thread.map(t => t.body)
    expect(bodies).toContain(d.message)
    expect(bodies.some(b => b.includes(d.reason))).toBe(true)
    expect(review.history.map(h => h.action)).toEqual(['milestone_funded', 'milestone_submitted', 'milestone_disputed'])
    // The admin may download the proof the review links to.
    expect((await get(`/api/attachments/${d.proofFileId}`, jar.admin)).status).toBe(200)
    // The parties themselves do not reach the admin's review.
    expect((await get(`/api/admin/disputes/${d.milestone.id}`, jar.racer)).status).toBe(403)
    expect((await get(`/api/admin/disputes/${d.milestone.id}`, jar.shop)).status).toBe(403)
  })

  it('answers 404 for a milestone that was never disputed', async () => {
    const { milestones } = await makeOrder(ctx)
    expect((await get(`/api/admin/disputes/${milestones[0]!.id}`, jar.admin)).status).toBe(404)
  })
})

describe('settling by refund', () => {
  it('refunds at the fake, writes one audit row with the refund, and tells both parties the note by e-mail and in the thread', async () => {
    const d = await makeDispute(ctx)
    const before = await footprint(d.milestone.id, d.requestId)
    const note = `No forged crank was bought: the invoice settles it (${d.milestone.id}).`
    const res = await settle(d.milestone.id, { outcome: 'refund', note })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toEqual({ milestoneId: d.milestone.id, outcome: 'refund', state: 'refunded', problem: null })

    // The milestone, and nothing else of the order.
    const after = await milestoneRow(ctx.db, d.milestone.id)
    expect(after.state).toBe('refunded')
    expect(after.refundedAt).not.toBeNull()
    for (const other of d.milestones.slice(1)) expect((await milestoneRow(ctx.db, other.id)).state).toBe('awaiting_payment')
    const [order] = await ctx.db.select().from(schema.orders).where(eq(schema.orders.id, d.orderId))
    expect(order!.status).toBe('active')

    // One refund row, and the refund exists at the payment service for the whole deposit.
    const refunds = (await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, d.milestone.id))).filter(p => p.kind === 'refund')
    expect(refunds).toHaveLength(1)
    const atStripe = await ctx.stripe.refunds.retrieve(refunds[0]!.stripeRefundId!)
    expect(atStripe).toMatchObject({ status: 'succeeded', amount: d.milestone.amountCents })

    // Exactly one audit row for the decision, with actor, before and after (the refund in it).
    const admin = await actorByEmail(ctx.db, PEOPLE.admin)
    const audit = await auditFor(d.milestone.id)
    expect(audit).toHaveLength(before.audit + 1)
    expect(audit).toHaveLength(1)
    expect(audit[0]).toMatchObject({
      action: 'dispute.settle', actorId: admin.id, note,
      before: { state: 'disputed', amountCents: d.milestone.amountCents, disputeReason: d.reason },
      after: { state: 'refunded', outcome: 'refund', refund: atStripe.id, amountCents: d.milestone.amountCents },
    })

    // The note in the thread, as the racer reads it.
    const thread = await get(`/api/requests/${d.requestId}/messages`, jar.racer)
    expect(thread.body.messages.filter((m: { body: string }) => m.body.includes(note))).toHaveLength(1)
    // One e-mail to each party, with the outcome and the note, plain and HTML.
    const mails = await ctx.db.select().from(schema.mailOutbox).where(like(schema.mailOutbox.dedupeKey, `settled:${d.milestone.id}:%`))
    expect(mails.map(m => m.toAddress).sort()).toEqual([PEOPLE.shop, PEOPLE.racer].sort())
    const racerMail = await waitForMail(PEOPLE.racer, m => m.text.includes(note), OUTBOX_WAIT_MS)
    expect(racerMail.subject).toBe(`Dispute settled: ${d.milestone.title} refunded to the racer`)
    expect(racerMail.text).toContain('refunded to the card it was paid with')
    expect(racerMail.html).toContain('No forged crank was bought')
    const shopMail = await waitForMail(PEOPLE.shop, m => m.text.includes(note), OUTBOX_WAIT_MS)
    expect(shopMail.text).toContain('goes back to the racer')

    // The racer's order page shows the outcome and the note.
    const seen = (await get(`/api/orders/${d.orderId}`, jar.racer)).body
    expect(seen.milestones[0].state).toBe('refunded')
    expect(seen.refundedCents).toBe(d.milestone.amountCents)
    expect(seen.events.find((e: { action: string }) => e.action === 'dispute_settled').detail).toBe(`refund: ${note}`)

    // Settled once: a second decision is a 409 and changes nothing.
    const settled = await footprint(d.milestone.id, d.requestId)
    expect((await settle(d.milestone.id, { outcome: 'release', note: 'Changed my mind about this one.' })).status).toBe(409)
    expect(await footprint(d.milestone.id, d.requestId)).toEqual(settled)

    // The list now carries it under the settled ones.
    const list = (await get('/api/admin/disputes', jar.admin)).body as DisputeList
    expect(list.open.some(x => x.milestoneId === d.milestone.id)).toBe(false)
    expect(list.settled.find(x => x.milestoneId === d.milestone.id)).toMatchObject({ outcome: 'refund', note, state: 'refunded', reason: d.reason })
  })

  it('writes nothing when the payment service refuses the refund: the audit row and the change go together', async () => {
    const d = await makeDispute(ctx)
    // A payment the service has never heard of: its refund is refused and the transaction rolls back.
    await ctx.db.update(schema.payments).set({ stripePaymentIntentId: 'pi_unknown_to_the_service' })
      .where(and(eq(schema.payments.milestoneId, d.milestone.id), eq(schema.payments.kind, 'checkout')))
    const before = await footprint(d.milestone.id, d.requestId)
    const res = await settle(d.milestone.id, { outcome: 'refund', note: 'The invoice does not match the quote.' })
    expect(res.status).toBe(502)
    expect(res.body.message).toContain('payment service')
    expect(await footprint(d.milestone.id, d.requestId)).toEqual(before)
    expect(before.state).toBe('disputed')
  })
})

describe('settling by release', () => {
  it('approves and pays out to the shop with a transfer at the fake; one audit row for the decision, the note to both', async () => {
    const d = await makeDispute(ctx)
    const note = `The invoice shows the forged crank on page two (${d.milestone.id}).`
    const res = await settle(d.milestone.id, { outcome: 'release', note })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toEqual({ milestoneId: d.milestone.id, outcome: 'release', state: 'released', problem: null })
    expect((await milestoneRow(ctx.db, d.milestone.id)).state).toBe('released')
    const rows = await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, d.milestone.id))
    expect(rows.filter(p => p.kind === 'refund')).toHaveLength(0)
    const transfer = rows.find(p => p.kind === 'transfer')!
    const atStripe = await ctx.stripe.transfers.retrieve(transfer.stripeTransferId!)
    expect(atStripe.amount).toBe(d.milestone.amountCents - d.milestone.feeCents)
    expect(atStripe.metadata).toMatchObject({ milestone_id: String(d.milestone.id) })

    const admin = await actorByEmail(ctx.db, PEOPLE.admin)
    const audit = await auditFor(d.milestone.id)
    const decisions = audit.filter(a => a.actorId === admin.id)
    expect(decisions).toHaveLength(1)
    expect(decisions[0]).toMatchObject({ action: 'dispute.settle', note, before: { state: 'disputed' }, after: { state: 'approved', outcome: 'release' } })
    // The payout that follows is recorded as every payout is: by the system, with its transfer.
    expect(audit.filter(a => a.actorId === null)).toMatchObject([{ action: 'milestone.release', after: { state: 'released', transfer: atStripe.id } }])

    const racerMail = await waitForMail(PEOPLE.racer, m => m.text.includes(note), OUTBOX_WAIT_MS)
    expect(racerMail.subject).toBe(`Dispute settled: ${d.milestone.title} released to the shop`)
    const shopMail = await waitForMail(PEOPLE.shop, m => m.text.includes(note), OUTBOX_WAIT_MS)
    expect(shopMail.text).toContain('is released to you')
    const thread = await get(`/api/requests/${d.requestId}/messages`, jar.shop)
    expect(thread.body.messages.some((m: { body: string }) => m.body.includes(note))).toBe(true)
  })
})

describe('refusals write nothing', () => {
  it('answers 409 for a milestone that is not disputed, with no audit row', async () => {
    const { racer, milestones, requestId } = await makeOrder(ctx)
    const m = milestones[0]!
    await fundMilestone(ctx, racer, m.id)
    const before = await footprint(m.id, requestId)
    const res = await settle(m.id, { outcome: 'refund', note: 'The shop has not started the work.' })
    expect(res.status).toBe(409)
    expect(res.body.message).toContain('funded')
    expect(await footprint(m.id, requestId)).toEqual(before)
    expect(before).toMatchObject({ state: 'funded', audit: 0, mail: 0 })
  })

  it.each([
    ['no body', {}, 'outcome'],
    ['no note', { outcome: 'refund' }, 'note'],
    ['a note too short to explain anything', { outcome: 'refund', note: 'no' }, 'note'],
    ['a note too long for an e-mail', { outcome: 'release', note: 'x'.repeat(2001) }, 'note'],
    ['an outcome that does not exist', { outcome: 'split', note: 'Half to each side, seems fair.' }, 'outcome'],
    ['a field the route does not take', { outcome: 'refund', note: 'The invoice does not match.', amountCents: 1 }, 'amountCents'],
  ])('answers 400 for %s, naming the field, and writes nothing', async (_what, body, field) => {
    const d = await makeDispute(ctx)
    const before = await footprint(d.milestone.id, d.requestId)
    const res = await settle(d.milestone.id, body)
    expect(res.status).toBe(400)
    expect(JSON.stringify(res.body)).toContain(field)
    expect(await footprint(d.milestone.id, d.requestId)).toEqual(before)
  })

  it('refuses the deal\'s own parties (403) and anonymous callers (401), writing nothing', async () => {
    const d = await makeDispute(ctx)
    const before = await footprint(d.milestone.id, d.requestId)
    const body = { outcome: 'refund', note: 'Give me my deposit back, please.' }
    expect((await settle(d.milestone.id, body, jar.racer)).status).toBe(403)
    expect((await settle(d.milestone.id, body, jar.shop)).status).toBe(403)
    expect((await api(`/api/admin/disputes/${d.milestone.id}/settle`, json('POST', body, null, address))).status).toBe(401)
    expect(await footprint(d.milestone.id, d.requestId)).toEqual(before)
  })
})

describe('the dashboard figures for disputes and money', () => {
  const overview = async () => (await get('/api/admin/overview', jar.admin)).body as AdminOverview

  it('counts open disputes with the oldest one\'s age, from the milestones table', async () => {
    const o = await overview()
    const open = await ctx.db.select({ at: schema.milestones.disputedAt }).from(schema.milestones).where(eq(schema.milestones.state, 'disputed'))
    expect(o.disputes.open).toBe(open.length)
    const oldest = open.map(r => r.at!.getTime()).sort((a, b) => a - b)[0]
    expect(o.disputes.oldestOpenedAt).toBe(oldest === undefined ? null : new Date(oldest).toISOString())
    if (oldest !== undefined) expect(Math.abs(o.disputes.oldestAgeHours! - (Date.now() - oldest) / 3_600_000)).toBeLessThan(0.1)
  })

  it('moves by one dispute, one deposit and one refund as they happen this month', async () => {
    const start = await overview()
    expect(start.payments.month).toBe(new Date().toISOString().slice(0, 7))
    const d = await makeDispute(ctx)
    const disputed = await overview()
    expect(disputed.disputes.open).toBe(start.disputes.open + 1)
    expect(disputed.payments.count).toBe(start.payments.count + 1)
    expect(disputed.payments.amountCents).toBe(start.payments.amountCents + d.milestone.amountCents)
    expect((await settle(d.milestone.id, { outcome: 'refund', note: 'No work was done against this deposit.' })).status).toBe(200)
    // The refund's own charge.refunded event reaches the app too; it must not count a second refund.
    await eventually('the refund event processed', async () => {
      const [e] = await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.outcome, `already refunded: milestone ${d.milestone.id}`))
      return e
    })
    const settled = await overview()
    expect(settled.disputes.open).toBe(start.disputes.open)
    expect(settled.payments.count).toBe(disputed.payments.count)
    expect(settled.payments.refunds).toEqual({ count: start.payments.refunds.count + 1, amountCents: start.payments.refunds.amountCents + d.milestone.amountCents })
  })

  it('counts a month by its own rows: next month starts at nothing captured yet', async () => {
    const now = new Date()
    const nextMonth = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() + 1, 1))
    const o = await adminOverview(ctx.db, nextMonth)
    expect(o.payments).toEqual({ month: nextMonth.toISOString().slice(0, 7), count: 0, amountCents: 0, refunds: { count: 0, amountCents: 0 } })
  })
})

describe('the demo\'s open dispute', () => {
  it('is seeded through the payments fake, once, and an admin can settle it like any other', async () => {
    const storage = createStorage({ driver: fsDriver({ base: testUploadsDir() }) })
    expect(await seedDemoDispute(ctx.db, storage, ctx.stripe)).toBe(true)
    expect(await seedDemoDispute(ctx.db, storage, ctx.stripe)).toBe(false)
    const list = (await get('/api/admin/disputes', jar.admin)).body as DisputeList
    const seeded = list.open.find(x => x.title === DEMO_DEAL_TITLES.disputed)!
    expect(seeded).toMatchObject({ racer: { name: expect.any(String) }, shop: { slug: 'cinder-flats-performance' } })
    const review = (await get(`/api/admin/disputes/${seeded.milestoneId}`, jar.admin)).body as DisputeReview
    const m = review.order.milestones.find(x => x.id === seeded.milestoneId)!
    expect(m.proofs).toHaveLength(1)
    expect((await get(`/api/attachments/${m.proofs[0]!.id}`, jar.admin)).status).toBe(200)
    // The deposit exists at the fake: a release pays out from it.
    const res = await settle(seeded.milestoneId, { outcome: 'release', note: 'The crank swap was agreed in the shop by phone.' })
    expect(res.body).toMatchObject({ outcome: 'release', state: 'released', problem: null })
  })
})
