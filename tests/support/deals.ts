import { eq } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { inject } from 'vitest'
import * as schema from '../../server/database/schema'
import type { Database } from '../../server/database/types'
import { type DealActor, type DealContext, loadActor } from '../../server/services/deal-context'
import { acceptQuote, createRequest, sendQuote } from '../../server/services/deals'
import type { QuoteInput, QuoteRequestInput } from '../../shared/schemas/deals'
import { quoteRequestSchema, quoteSchema } from '../../shared/schemas/deals'
import { startCheckout } from '../../server/services/payments'
import { disputeMilestone, submitMilestone } from '../../server/services/milestones'
import { postMessage } from '../../server/services/messages'
import { type CookieJar, as, freshAddress, json, signedIn } from './auth'
import { api } from './context'
import { CARDS, eventually, payOnFakePage, runningFakeClient } from './payments'

/**
 * The deal services' context for tests: a pool on the test database (so two transactions can race),
 * the SDK against the running payments fake, and the app's settings. Its webhooks go to the built app.
 */
export async function dealTestContext(overrides: Partial<DealContext['config']> = {}): Promise<{ ctx: DealContext, db: Database, close: () => Promise<void> }> {
  const pool = mysql.createPool({ uri: inject('databaseUrl'), connectionLimit: 6, timezone: 'Z' })
  const db = drizzle(pool, { schema, mode: 'default' })
  const ctx: DealContext = {
    db,
    stripe: runningFakeClient(),
    config: { platformFeeBps: 500, autoApproveDays: 7, siteUrl: inject('baseUrl'), ...overrides },
    now: () => new Date(),
  }
  return { ctx, db, close: () => pool.end() }
}

export async function actorByEmail(db: Database, email: string): Promise<DealActor> {
  const [user] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email)).limit(1)
  const actor = await loadActor(db, user!.id)
  if (!actor) throw new Error(`no actor for ${email}`)
  return actor
}

/** Seeded people the deal tests act as (invented demo accounts, see the README). */
export const PEOPLE = {
  racer: 'jonah@racer.test',
  otherRacer: 'alma@racer.test',
  shop: 'marisol@harrow-creek.test',
  shopSlug: 'harrow-creek-engine-works',
  otherShop: 'gideon@ninefold.test',
  admin: 'admin@torquewright.test',
} as const

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

export function requestInput(overrides: Partial<QuoteRequestInput> = {}): QuoteRequestInput {
  return quoteRequestSchema.parse({
    shop: PEOPLE.shopSlug,
    title: 'Bracket engine, 10.5 class',
    targetHp: 640,
    targetTq: 560,
    targetStandard: 'SAE_J1349_2004',
    displacementCapCi: 440,
    fuel: 'race_gas',
    aspiration: 'na',
    intendedUse: 'drag',
    transmission: 'automatic',
    stallRpm: 4800,
    shiftRpm: 7200,
    budgetMinCents: 2_000_000,
    budgetMaxCents: 3_000_000,
    deadline: inDays(120),
    notes: 'Street-legal exhaust, must fit under the stock hood line.',
    ...overrides,
  })
}

/** A quote whose line items total $24,600.00, in three milestones that add up to it. */
export function quoteInput(overrides: Partial<QuoteInput> = {}): QuoteInput {
  return quoteSchema.parse({
    lineItems: [
      { category: 'Machine work', description: 'Bore, hone, deck and line-hone the block', partNumber: '', quantity: 1, unitPriceCents: 480_000 },
      { category: 'Rotating assembly', description: 'Forged crank, rods and pistons', partNumber: 'RA-4412', quantity: 1, unitPriceCents: 920_000 },
      { category: 'Cylinder heads', description: 'Ported aluminium heads, pair', partNumber: 'HD-205', quantity: 2, unitPriceCents: 330_000 },
      { category: 'Assembly and dyno', description: 'Assembly, break-in and tuning on the engine dyno', partNumber: '', quantity: 1, unitPriceCents: 400_000 },
    ],
    milestones: [
      { title: 'Deposit and parts order', deliverable: 'Parts ordered, invoices shared', amountCents: 738_000, dueDate: inDays(14) },
      { title: 'Short block', deliverable: 'Machined and assembled short block, photos and measurements', amountCents: 984_000, dueDate: inDays(60) },
      { title: 'Dyno delivery', deliverable: 'Finished engine with the delivery pull', amountCents: 738_000, dueDate: inDays(100) },
    ],
    validUntil: inDays(30),
    notes: 'Prices hold for 30 days.',
    guarantee: null,
    ...overrides,
  })
}

/** A request from the racer, quoted by the shop and accepted: an order with three milestones awaiting payment. */
export async function makeOrder(ctx: DealContext, opts: { racer?: DealActor, shop?: DealActor, request?: Partial<QuoteRequestInput>, quote?: Partial<QuoteInput> } = {}) {
  const racer = opts.racer ?? await actorByEmail(ctx.db, PEOPLE.racer)
  const shop = opts.shop ?? await actorByEmail(ctx.db, PEOPLE.shop)
  const { id: requestId } = await createRequest(ctx, racer, requestInput(opts.request))
  const { quoteId, revision } = await sendQuote(ctx, shop, requestId, quoteInput(opts.quote))
  const { orderId } = await acceptQuote(ctx, racer, quoteId, revision)
  const list = await ctx.db.select().from(schema.milestones).where(eq(schema.milestones.orderId, orderId)).orderBy(schema.milestones.position)
  return { racer, shop, requestId, quoteId, orderId, milestones: list }
}

export async function milestoneRow(db: Database, id: number) {
  const [row] = await db.select().from(schema.milestones).where(eq(schema.milestones.id, id))
  return row!
}

export { schema }

/** Pays a milestone as the racer would: a Checkout Session from the service, the fake's page with 4242…, then waits for the webhook. */
export async function fundMilestone(ctx: DealContext, racer: DealActor, milestoneId: number) {
  const { url, sessionId } = await startCheckout(ctx, racer, milestoneId)
  const page = await payOnFakePage(url, CARDS.succeeds)
  if (page.status !== 303) throw new Error(`the fake's page answered ${page.status}`)
  await eventually(`milestone ${milestoneId} funded`, async () => (await milestoneRow(ctx.db, milestoneId)).state === 'funded')
  return { sessionId, redirect: page.location }
}

/**
 * A disputed first milestone, made the way people make one: the racer writes in the thread, pays the
 * deposit on the fake's page, the shop uploads a proof file (over HTTP) and submits with notes, and
 * the racer disputes it. Everything else about the order is as makeOrder leaves it.
 */
export async function makeDispute(ctx: DealContext, opts: { title?: string, reason?: string } = {}) {
  const tag = Math.random().toString(36).slice(2, 8)
  const title = opts.title ?? `Disputed deal ${tag}`
  const order = await makeOrder(ctx, { request: { title } })
  const milestone = order.milestones[0]!
  const message = `Please share the parts invoices before the block goes out (${tag}).`
  await postMessage(ctx, order.racer, order.requestId, { body: message, attachmentIds: [] })
  await fundMilestone(ctx, order.racer, milestone.id)
  const shopRow = await signedIn(PEOPLE.shop)
  const pdf = new Uint8Array(Buffer.from(`%PDF-1.4\n% parts invoice ${tag}\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n`))
  const upload = await api(`/api/attachments?kind=proof&name=parts-invoice-${tag}.pdf`, { method: 'POST', headers: as(shopRow, freshAddress(), { 'content-type': 'application/octet-stream' }), body: pdf })
  if (upload.status !== 201) throw new Error(`the proof upload answered ${upload.status}: ${JSON.stringify(upload.body)}`)
  const notes = `Parts ordered from three suppliers; the invoice is attached (${tag}).`
  await submitMilestone(ctx, order.shop, milestone.id, { notes, proofFileIds: [upload.body.id as number], deliveryPullId: null })
  const reason = opts.reason ?? `The invoice lists a cast crank, the quote says forged (${tag}).`
  await disputeMilestone(ctx, order.racer, milestone.id, reason)
  return { ...order, title, milestone: await milestoneRow(ctx.db, milestone.id), proofFileId: upload.body.id as number, proofName: `parts-invoice-${tag}.pdf`, notes, reason, message }
}

export type DealParty = 'racer' | 'shop' | 'otherShop' | 'otherRacer'

/** Signed-in sessions of the seeded deal people, for route tests that act as each side and as strangers. */
export async function signedInParties(who: readonly DealParty[] = ['racer', 'shop', 'otherShop', 'otherRacer']): Promise<Record<DealParty, CookieJar>> {
  const jars = {} as Record<DealParty, CookieJar>
  for (const party of who) jars[party] = await signedIn(PEOPLE[party])
  return jars
}

/** POST (JSON) and GET as a given session, all from one client address. */
export function dealHttp(address = freshAddress()) {
  return {
    post: (path: string, body: unknown, who: CookieJar) => api(path, json('POST', body, who, address)),
    get: (path: string, who: CookieJar) => api(path, { headers: as(who, address) }),
  }
}
