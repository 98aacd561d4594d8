// The demo's deals: invented requests, quotes and an order between the demo accounts, made
// through the deal services so their figures (fees, milestones, history) are what the app makes.
// In a fresh database they come first, so the access matrix can name them by id (1, 2 and 3).
import { createHash, randomUUID } from 'node:crypto'
import { eq, gte } from 'drizzle-orm'
import type { MySql2Database } from 'drizzle-orm/mysql2'
import type Stripe from 'stripe'
import type { Storage } from 'unstorage'
import * as schema from '../../server/database/schema'
import { type DealContext, loadActor } from '../../server/services/deal-context'
import { storeDealFile } from '../../server/services/deal-files'
import { acceptQuote, createRequest, sendQuote } from '../../server/services/deals'
import { postMessage } from '../../server/services/messages'
import { disputeMilestone, submitMilestone } from '../../server/services/milestones'
import { processStripeEvent, startCheckout } from '../../server/services/payments'
import { splitByBasisPoints } from '../../shared/money'
import { quoteRequestSchema, quoteSchema } from '../../shared/schemas/deals'

type Db = MySql2Database<typeof schema>

/** The titles that mark the demo deals, so a second seed leaves them as they are. */
export const DEMO_DEAL_TITLES = {
  order: 'Class-legal small block for a 10.90 index car',
  open: 'Boosted four-valve for road-course weekends',
  quoted: 'Big-inch bracket engine on methanol',
  disputed: 'Turbo small block for a street/strip car',
} as const

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

async function actor(db: Db, email: string) {
  const [u] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email)).limit(1)
  const a = u ? await loadActor(db, u.id) : null
  if (!a) throw new Error(`the demo account ${email} is missing`)
  return a
}

function quote(lines: [number, number, number], guarantee: { hp: number } | null) {
  const [a, b, c] = lines
  // 30 / 40 / 30 % of the total, split to the cent by the largest remainder method.
  const [m1, m2, m3] = splitByBasisPoints(a + b + c, [3000, 4000, 3000])
  return quoteSchema.parse({
    lineItems: [
      { category: 'Machine work', description: 'Bore, hone with torque plate, deck and line-hone', quantity: 1, unitPriceCents: a },
      { category: 'Rotating assembly', description: 'Forged crank, H-beam rods, forged pistons, balanced', partNumber: 'RA-3620', quantity: 1, unitPriceCents: b },
      { category: 'Assembly and dyno', description: 'Assembly, break-in and tuning on the engine dyno', quantity: 1, unitPriceCents: c },
    ],
    milestones: [
      { title: 'Deposit and parts order', deliverable: 'Parts ordered, invoices shared', amountCents: m1, dueDate: inDays(14) },
      { title: 'Short block', deliverable: 'Machined, measured and assembled short block', amountCents: m2, dueDate: inDays(50) },
      { title: 'Dyno delivery', deliverable: 'Finished engine with the delivery pull', amountCents: m3, dueDate: inDays(90) },
    ],
    validUntil: inDays(30),
    notes: 'Prices hold for 30 days; parts are ordered once the deposit is in.',
    guarantee: guarantee ? { ...guarantee, tolerancePct: 2, standard: 'SAE_J1349_2004' } : null,
  })
}

/** Seeds the demo deals unless they exist; their e-mails are not sent (nobody is waiting for them). */
export async function seedDemoDeals(db: Db, platformFeeBps = 500): Promise<number> {
  const [done] = await db.select({ id: schema.quoteRequests.id }).from(schema.quoteRequests).where(eq(schema.quoteRequests.title, DEMO_DEAL_TITLES.order)).limit(1)
  if (done) return 0
  const started = new Date(Date.now() - 1000)
  const noPayments = new Proxy({}, { get: () => {
    throw new Error('the demo seed makes no payments')
  } }) as Stripe
  const ctx: DealContext = { db, stripe: noPayments, config: { platformFeeBps, autoApproveDays: 7, siteUrl: 'http://127.0.0.1:3000' }, now: () => new Date() }
  const [alma, jonah, keon, marisol, hollis] = await Promise.all([
    actor(db, 'alma@racer.test'), actor(db, 'jonah@racer.test'), actor(db, 'keon@racer.test'),
    actor(db, 'marisol@harrow-creek.test'), actor(db, 'hollis@tallgrass.test'),
  ])
  const [harrowBuild] = await db.select({ slug: schema.builds.slug }).from(schema.builds).where(eq(schema.builds.shopId, marisol.shopId!)).limit(1)
  const request = (overrides: Record<string, unknown>) => quoteRequestSchema.parse({
    targetStandard: 'SAE_J1349_2004', fuel: 'race_gas', aspiration: 'na', intendedUse: 'drag', transmission: 'automatic',
    stallRpm: 5200, shiftRpm: 7400, budgetMinCents: 1_800_000, budgetMaxCents: 2_600_000, deadline: inDays(120), ...overrides,
  })

  // 1: an accepted quote and an open order (Alma with Harrow Creek).
  const one = await createRequest(ctx, alma, request({
    shop: 'harrow-creek-engine-works', build: harrowBuild?.slug, title: DEMO_DEAL_TITLES.order, targetHp: 610, targetTq: 520, displacementCapCi: 365,
    notes: 'The class caps displacement at 365 ci and wants a sealed intake. Car weighs 2,900 lb with driver.',
  }))
  await postMessage(ctx, marisol, one.id, { body: 'Thanks Alma. Is the 365 ci cap measured with the final overbore?', attachmentIds: [] })
  await postMessage(ctx, alma, one.id, { body: 'Yes, as-built. The tech sheet says bore × stroke at the final hone.', attachmentIds: [] })
  const q1 = await sendQuote(ctx, marisol, one.id, quote([640_000, 1_120_000, 520_000], { hp: 600 }))
  await acceptQuote(ctx, alma, q1.quoteId, q1.revision)

  // 2: an open request with no quote yet (Jonah to Ninefold).
  const two = await createRequest(ctx, jonah, request({
    shop: 'ninefold-machine', title: DEMO_DEAL_TITLES.open, targetHp: 720, targetTq: 590, fuel: 'e85', aspiration: 'turbo',
    intendedUse: 'road_course', transmission: 'sequential', stallRpm: null, shiftRpm: 7800, displacementCapCi: null,
    notes: 'Twenty-minute sessions; oil temperature has to stay under control.',
  }))
  await postMessage(ctx, jonah, two.id, { body: 'I can bring the car for a chassis-dyno baseline if that helps.', attachmentIds: [] })

  // 3: a quote in its second revision, waiting for an answer (Keon with Tallgrass).
  const three = await createRequest(ctx, keon, request({
    shop: 'tallgrass-racing-engines', title: DEMO_DEAL_TITLES.quoted, targetHp: 980, targetTq: 820, fuel: 'methanol', displacementCapCi: null, budgetMaxCents: 4_200_000,
  }))
  await sendQuote(ctx, hollis, three.id, quote([900_000, 1_900_000, 800_000], null))
  await postMessage(ctx, keon, three.id, { body: 'Could the rotating assembly come down a little? I have a crank already.', attachmentIds: [] })
  await sendQuote(ctx, hollis, three.id, quote([900_000, 1_500_000, 800_000], { hp: 950 }))

  await db.delete(schema.mailOutbox).where(gte(schema.mailOutbox.createdAt, started))
  return 3
}

/**
 * An open dispute for the demo admin to settle: Samir pays the first deposit of an order with
 * Cinder Flats on the local payments fake's own page (the test card), the shop submits its proof,
 * and Samir disputes it. The payment is real at the fake, so the admin's refund or release goes
 * through it like any other. The completion is recorded here rather than by the webhook, because
 * the app is not running yet while the demo seeds. Returns false when it exists already.
 */
export async function seedDemoDispute(db: Db, storage: Storage, stripe: Stripe, platformFeeBps = 500): Promise<boolean> {
  const [done] = await db.select({ id: schema.quoteRequests.id }).from(schema.quoteRequests).where(eq(schema.quoteRequests.title, DEMO_DEAL_TITLES.disputed)).limit(1)
  if (done) return false
  const started = new Date(Date.now() - 1000)
  const ctx: DealContext = { db, stripe, config: { platformFeeBps, autoApproveDays: 7, siteUrl: 'http://127.0.0.1:3000' }, now: () => new Date() }
  const [samir, priya] = await Promise.all([actor(db, 'samir@racer.test'), actor(db, 'priya@cinderflats.test')])
  const request = await createRequest(ctx, samir, quoteRequestSchema.parse({
    shop: 'cinder-flats-performance', title: DEMO_DEAL_TITLES.disputed, targetHp: 780, targetTq: 690, targetStandard: 'SAE_J1349_2004',
    displacementCapCi: null, fuel: 'e85', aspiration: 'turbo', intendedUse: 'street_strip', transmission: 'automatic', stallRpm: 4200, shiftRpm: 6800,
    budgetMinCents: 2_200_000, budgetMaxCents: 3_000_000, deadline: inDays(150),
    notes: 'Single turbo, street manners on pump E85. Forged bottom end, the block must take the boost.',
  }))
  await postMessage(ctx, priya, request.id, { body: 'We order the rotating assembly as soon as the first deposit is in; invoices go in this thread.', attachmentIds: [] })
  const q = await sendQuote(ctx, priya, request.id, quote([720_000, 1_360_000, 560_000], null))
  const { orderId } = await acceptQuote(ctx, samir, q.quoteId, q.revision)
  const [first] = await db.select().from(schema.milestones).where(eq(schema.milestones.orderId, orderId)).orderBy(schema.milestones.position).limit(1)

  const { url, sessionId } = await startCheckout(ctx, samir, first!.id)
  const page = await fetch(url, { method: 'POST', redirect: 'manual', body: new URLSearchParams({ email: 'samir@racer.test', name: 'Samir Haddad', cardNumber: '4242 4242 4242 4242', expiry: '12/39', cvc: '123' }) })
  if (page.status !== 303) throw new Error(`the payments fake's page answered ${page.status}`)
  const session = await stripe.checkout.sessions.retrieve(sessionId)
  await processStripeEvent(ctx, { id: `evt_demo_seed_${sessionId}`, object: 'event', type: 'checkout.session.completed', data: { object: session } } as unknown as Stripe.Event)

  const invoice = Buffer.from('%PDF-1.4\n% Cinder Flats Performance: parts order for the rotating assembly (invented demo document)\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n')
  const hash = createHash('sha256').update(invoice).digest('hex')
  const proof = await storeDealFile(db, storage, priya.id, { name: 'rotating-assembly-order.pdf', bytes: invoice, mime: 'application/pdf', sha256: hash, storageKey: `proofs/${hash.slice(0, 16)}-${randomUUID()}.pdf`, kind: 'proof' })
  await submitMilestone(ctx, priya, first!.id, { notes: 'Rotating assembly ordered: cast crank (the forged one is back-ordered 10 weeks), forged rods and pistons. Order attached.', proofFileIds: [proof.id], deliveryPullId: null })
  await postMessage(ctx, samir, request.id, { body: 'The quote says a forged crank. A cast one will not live at this boost, and nobody asked me.', attachmentIds: [] })
  await disputeMilestone(ctx, samir, first!.id, 'The quote lists a forged crank; the order shows a cast one, swapped without asking.')
  await db.delete(schema.mailOutbox).where(gte(schema.mailOutbox.createdAt, started))
  return true
}
