// Quote requests, quotes with their revisions, acceptance into an order, and the views of both.
import { and, asc, desc, eq, inArray, isNull } from 'drizzle-orm'
import { alternativeView } from '../../shared/deals/alternative'
import { MoneyError, apportion, feeCents, formatCents, lineTotalCents, sumCents } from '../../shared/money'
import { QUOTE_LIMIT_MESSAGE, quoteLimitIssue, type QuoteInput, type QuoteRequestInput } from '../../shared/schemas/deals'
import type {
  DashboardOrderRow, DashboardRequestRow, DashboardView, QuoteRevisionView, QuoteView, RequestView,
} from '../../shared/types/deals'
import {
  shops, builds, files, milestones, orders, quoteLineItems, quoteMilestones, quoteRequests, quoteRevisions, quotes,
  requestAttachments, requestMessages, users, type QuoteRevision,
} from '../database/schema'
import { inRetriedTransaction } from '../utils/transaction'
import {
  type DealActor, type DealContext, type Executor, conflict, forbidden, isoDay, lockRequest, notFound, partiesOf, recordDealEvent,
  requestVisibleTo, sideOf, unprocessable,
} from './deal-context'
import { claimFiles } from './deal-files'
import { unreadCounts } from './messages'
import { enqueueMail } from './outbox'

/**
 * A note from the system in a request's thread, attributed to whoever caused it. The request row is
 * locked and updated before the message row is written (see lockRequest): the parent first.
 */
export async function postEvent(tx: Executor, requestId: number, actorId: number | null, body: string, now: Date) {
  await lockRequest(tx, requestId)
  await tx.update(quoteRequests).set({ lastMessageAt: now }).where(eq(quoteRequests.id, requestId))
  await tx.insert(requestMessages).values({ requestId, senderId: actorId, kind: 'event', body, createdAt: now })
}

/** A racer's quote request to one shop (optionally from one of its published builds), with its attachments. */
export async function createRequest(ctx: DealContext, actor: DealActor, input: QuoteRequestInput): Promise<{ id: number }> {
  if (actor.role !== 'racer') throw forbidden('Only a racer can request a quote.')
  const [shop] = await ctx.db.select().from(shops).where(eq(shops.slug, input.shop)).limit(1)
  if (!shop) throw unprocessable(`There is no shop at "${input.shop}".`)
  let buildId: number | null = null
  if (input.build) {
    const [build] = await ctx.db.select({ id: builds.id }).from(builds)
      .where(and(eq(builds.slug, input.build), eq(builds.shopId, shop.id), eq(builds.status, 'published'))).limit(1)
    if (!build) throw unprocessable(`"${input.build}" is not a published build of ${shop.shopName}.`)
    buildId = build.id
  }
  const now = ctx.now()
  if (input.deadline !== null && input.deadline <= isoDay(now)) throw unprocessable('The deadline must be after today.')
  const id = await inRetriedTransaction(ctx.db, async (tx) => {
    const fileIds = await claimFiles(tx, actor.id, input.attachmentIds, ['attachment', 'photo'])
    const [row] = await tx.insert(quoteRequests).values({
      racerId: actor.id, shopId: shop.id, buildId, title: input.title, targetHp: input.targetHp, targetTq: input.targetTq,
      targetStandard: input.targetStandard, displacementCapCi: input.displacementCapCi, fuel: input.fuel, aspiration: input.aspiration,
      intendedUse: input.intendedUse, transmission: input.transmission, launchRpm: input.launchRpm, stallRpm: input.stallRpm, shiftRpm: input.shiftRpm,
      budgetMinCents: input.budgetMinCents, budgetMaxCents: input.budgetMaxCents, deadline: input.deadline, notes: input.notes,
      lastMessageAt: now, createdAt: now,
    }).$returningId()
    const requestId = row!.id
    if (fileIds.length > 0) await tx.insert(requestAttachments).values(fileIds.map(fileId => ({ requestId, fileId })))
    await postEvent(tx, requestId, actor.id, `${actor.name} asked ${shop.shopName} for a quote.`, now)
    await recordDealEvent(tx, { requestId, actorId: actor.id, action: 'request_sent' })
    const parties = await partiesOf(tx, requestId)
    await enqueueMail(tx, parties.shopEmail, {
      kind: 'new_request', shopName: shop.shopName, racerName: actor.name, title: input.title, link: `${ctx.config.siteUrl}/deals/requests/${requestId}`,
    }, `request:${requestId}`)
    return requestId
  })
  return { id }
}

/** Loads a request the actor may see, locked for update when asked; 404 otherwise. */
async function visibleRequest(tx: Executor, actor: DealActor, requestId: number, lock = false) {
  const query = tx.select().from(quoteRequests).where(and(eq(quoteRequests.id, requestId), requestVisibleTo(actor))).limit(1)
  const [row] = lock ? await query.for('update') : await query
  if (!row) throw notFound('That request')
  return row
}

/** Every figure of a quote revision: the total is the sum of the line items, the milestones add up to it exactly. */
export function priceQuote(input: QuoteInput, feeBps: number) {
  const over = quoteLimitIssue(input)
  if (over) throw unprocessable(`${over.message}.`)
  let priced
  try {
    const lineTotals = input.lineItems.map(l => lineTotalCents(l.unitPriceCents, l.quantity))
    priced = { lineTotals, total: sumCents(lineTotals), milestoneSum: sumCents(input.milestones.map(m => m.amountCents)) }
  }
  catch (error) {
    // Whatever figure the money module still refuses is bad input too: a 422 that names the limit, never a 500.
    if (error instanceof MoneyError) throw unprocessable(`${QUOTE_LIMIT_MESSAGE} (${error.message}).`)
    throw error
  }
  const { lineTotals, total, milestoneSum } = priced
  if (milestoneSum !== total) {
    throw unprocessable(`The milestones add up to ${formatCents(milestoneSum)} but the line items total ${formatCents(total)}: they must be equal, to the cent.`)
  }
  return { total, fee: feeCents(total, feeBps), lineTotals }
}

/** Sends a quote on a request, or a new revision of it; earlier revisions stay as they were. */
export async function sendQuote(ctx: DealContext, actor: DealActor, requestId: number, input: QuoteInput): Promise<{ quoteId: number, revision: number }> {
  const now = ctx.now()
  const today = isoDay(now)
  if (input.validUntil < today) throw unprocessable('The quote must be valid until today or later.')
  const early = input.milestones.find(m => m.dueDate < today)
  if (early) throw unprocessable(`The milestone "${early.title}" is due before today.`)
  const { total, fee } = priceQuote(input, ctx.config.platformFeeBps)
  // The request row is locked first (the parent of the quote and of the thread's note).
  return inRetriedTransaction(ctx.db, async (tx) => {
    const request = await visibleRequest(tx, actor, requestId, true)
    if (actor.shopId !== request.shopId) throw forbidden('Only the shop the request was sent to can quote it.')
    if (request.status === 'accepted' || request.status === 'withdrawn') throw conflict(`This request is ${request.status}; it cannot be quoted again.`)
    const [existing] = await tx.select().from(quotes).where(eq(quotes.requestId, requestId)).limit(1).for('update')
    let quoteId: number
    let revision: number
    if (existing) {
      if (existing.status === 'accepted') throw conflict('This quote was accepted; it cannot be revised.')
      quoteId = existing.id
      revision = existing.currentRevision + 1
      await tx.update(quotes).set({ status: 'sent', currentRevision: revision }).where(eq(quotes.id, quoteId))
    }
    else {
      const [row] = await tx.insert(quotes).values({ requestId, shopId: request.shopId, status: 'sent', currentRevision: 1, createdAt: now }).$returningId()
      quoteId = row!.id
      revision = 1
    }
    const [rev] = await tx.insert(quoteRevisions).values({
      quoteId, revision, totalCents: total, platformFeeBp: ctx.config.platformFeeBps, platformFeeCents: fee, validUntil: input.validUntil,
      notes: input.notes, guaranteeHp: input.guarantee?.hp ?? null, guaranteeTolerancePct: input.guarantee?.tolerancePct ?? null,
      guaranteeStandard: input.guarantee?.standard ?? null, alternative: input.alternative ?? null, createdAt: now,
    }).$returningId()
    const revisionId = rev!.id
    await tx.insert(quoteLineItems).values(input.lineItems.map((l, position) => ({ revisionId, position, ...l })))
    await tx.insert(quoteMilestones).values(input.milestones.map((m, position) => ({ revisionId, position, ...m })))
    await tx.update(quoteRequests).set({ status: 'quoted' }).where(eq(quoteRequests.id, requestId))
    const parties = await partiesOf(tx, requestId)
    await postEvent(tx, requestId, actor.id, `${parties.shopName} sent ${revision > 1 ? `revision ${revision} of the quote` : 'a quote'}: ${formatCents(total)} in ${input.milestones.length} milestone${input.milestones.length === 1 ? '' : 's'}.`, now)
    await recordDealEvent(tx, { requestId, actorId: actor.id, action: 'quote_sent', detail: `revision ${revision}, ${formatCents(total)}` })
    await enqueueMail(tx, parties.racerEmail, {
      kind: 'quote_sent', racerName: parties.racerName, shopName: parties.shopName, title: parties.title, totalCents: total, revision,
      validUntil: input.validUntil, link: `${ctx.config.siteUrl}/deals/requests/${requestId}`,
    }, `quote:${quoteId}:${revision}`)
    return { quoteId, revision }
  })
}

/** Locks a quote for its racer's answer: the request row first, then the quote (the order sendQuote takes them in). */
async function lockQuoteForRacer(tx: Executor, actor: DealActor, quoteId: number) {
  const [peek] = await tx.select({ requestId: quotes.requestId }).from(quotes).where(eq(quotes.id, quoteId)).limit(1)
  if (!peek) throw notFound('That quote')
  await lockRequest(tx, peek.requestId)
  const [row] = await tx.select({ quote: quotes, request: quoteRequests }).from(quotes)
    .innerJoin(quoteRequests, eq(quoteRequests.id, quotes.requestId))
    .where(and(eq(quotes.id, quoteId), requestVisibleTo(actor))).limit(1).for('update')
  if (!row) throw notFound('That quote')
  if (row.request.racerId !== actor.id) throw forbidden('Only the racer who asked for the quote can answer it.')
  return row
}

/** The racer declines the current revision; the shop may still send another. */
export async function declineQuote(ctx: DealContext, actor: DealActor, quoteId: number, reason: string): Promise<void> {
  const now = ctx.now()
  await inRetriedTransaction(ctx.db, async (tx) => {
    const { quote, request } = await lockQuoteForRacer(tx, actor, quoteId)
    if (quote.status !== 'sent') throw conflict(`This quote is ${quote.status}; only a quote waiting for an answer can be declined.`)
    await tx.update(quotes).set({ status: 'declined' }).where(eq(quotes.id, quoteId))
    await tx.update(quoteRequests).set({ status: 'declined' }).where(eq(quoteRequests.id, request.id))
    await postEvent(tx, request.id, actor.id, `${actor.name} declined revision ${quote.currentRevision} of the quote${reason ? `: ${reason}` : '.'}`, now)
    await recordDealEvent(tx, { requestId: request.id, actorId: actor.id, action: 'quote_declined', detail: reason })
  })
}

/** The racer accepts the current revision: an order is opened with its milestones, the fee shared among them to the cent. */
export async function acceptQuote(ctx: DealContext, actor: DealActor, quoteId: number, revision: number): Promise<{ orderId: number }> {
  const now = ctx.now()
  return inRetriedTransaction(ctx.db, async (tx) => {
    const { quote, request } = await lockQuoteForRacer(tx, actor, quoteId)
    if (quote.status !== 'sent') throw conflict(`This quote is ${quote.status}; only a quote waiting for an answer can be accepted.`)
    if (quote.currentRevision !== revision) throw conflict(`The shop has revised this quote: revision ${quote.currentRevision} is current. Review it before you accept.`)
    const [rev] = await tx.select().from(quoteRevisions).where(and(eq(quoteRevisions.quoteId, quoteId), eq(quoteRevisions.revision, revision))).limit(1)
    if (!rev) throw notFound('That revision')
    if (rev.validUntil < isoDay(now)) throw conflict(`This quote was valid until ${rev.validUntil}. Ask the shop for a new revision.`)
    const plan = await tx.select().from(quoteMilestones).where(eq(quoteMilestones.revisionId, rev.id)).orderBy(asc(quoteMilestones.position))
    const fees = apportion(rev.platformFeeCents, plan.map(m => m.amountCents))
    const [order] = await tx.insert(orders).values({
      requestId: request.id, quoteId, revisionId: rev.id, racerId: request.racerId, shopId: request.shopId,
      totalCents: rev.totalCents, platformFeeCents: rev.platformFeeCents, createdAt: now,
    }).$returningId()
    const orderId = order!.id
    await tx.insert(milestones).values(plan.map((m, i) => ({
      orderId, position: i, title: m.title, deliverable: m.deliverable, amountCents: m.amountCents, feeCents: fees[i]!,
      dueDate: m.dueDate, guaranteed: rev.guaranteeHp !== null && i === plan.length - 1, createdAt: now,
    })))
    await tx.update(quotes).set({ status: 'accepted' }).where(eq(quotes.id, quoteId))
    await tx.update(quoteRequests).set({ status: 'accepted' }).where(eq(quoteRequests.id, request.id))
    await postEvent(tx, request.id, actor.id, `${actor.name} accepted revision ${revision} of the quote (${formatCents(rev.totalCents)}). The order is open.`, now)
    await recordDealEvent(tx, { requestId: request.id, orderId, actorId: actor.id, action: 'quote_accepted', detail: `revision ${revision}` })
    const parties = await partiesOf(tx, request.id)
    await enqueueMail(tx, parties.shopEmail, {
      kind: 'quote_accepted', shopName: parties.shopName, racerName: parties.racerName, title: parties.title, totalCents: rev.totalCents,
      link: `${ctx.config.siteUrl}/deals/orders/${orderId}`,
    }, `accepted:${quoteId}`)
    return { orderId }
  })
}

async function revisionViews(db: Executor, quoteId: number): Promise<QuoteRevisionView[]> {
  const revs = await db.select().from(quoteRevisions).where(eq(quoteRevisions.quoteId, quoteId)).orderBy(desc(quoteRevisions.revision))
  if (revs.length === 0) return []
  const ids = revs.map(r => r.id)
  const [lines, plan] = await Promise.all([
    db.select().from(quoteLineItems).where(inArray(quoteLineItems.revisionId, ids)).orderBy(asc(quoteLineItems.position)),
    db.select().from(quoteMilestones).where(inArray(quoteMilestones.revisionId, ids)).orderBy(asc(quoteMilestones.position)),
  ])
  return revs.map((r: QuoteRevision) => ({
    revision: r.revision,
    totalCents: r.totalCents,
    platformFeeBps: r.platformFeeBp,
    platformFeeCents: r.platformFeeCents,
    validUntil: r.validUntil,
    notes: r.notes,
    guarantee: r.guaranteeHp === null ? null : { hp: r.guaranteeHp, tolerancePct: r.guaranteeTolerancePct ?? 0, standard: r.guaranteeStandard ?? 'SAE_J1349_2004' },
    createdAt: r.createdAt.toISOString(),
    lineItems: lines.filter(l => l.revisionId === r.id).map(l => ({
      position: l.position, category: l.category, description: l.description, partNumber: l.partNumber, quantity: l.quantity,
      unitPriceCents: l.unitPriceCents, lineTotalCents: l.unitPriceCents * l.quantity,
    })),
    milestones: plan.filter(m => m.revisionId === r.id).map(m => ({ position: m.position, title: m.title, deliverable: m.deliverable, amountCents: m.amountCents, dueDate: m.dueDate })),
    alternative: r.alternative ? alternativeView(r.alternative) : null,
  }))
}

/** A request with its quote (every revision) and order, as its parties see it. */
export async function getRequestView(ctx: DealContext, actor: DealActor, requestId: number): Promise<RequestView> {
  const request = await visibleRequest(ctx.db, actor, requestId)
  const [extra] = await ctx.db.select({ racerName: users.name, shop: shops }).from(quoteRequests)
    .innerJoin(users, eq(users.id, quoteRequests.racerId)).innerJoin(shops, eq(shops.id, quoteRequests.shopId))
    .where(eq(quoteRequests.id, requestId)).limit(1)
  const [build] = request.buildId === null ? [] : await ctx.db.select({ slug: builds.slug, title: builds.title }).from(builds).where(eq(builds.id, request.buildId)).limit(1)
  const attachments = await ctx.db.select({ id: files.id, name: files.originalName, mime: files.mime, sizeBytes: files.sizeBytes }).from(requestAttachments)
    .innerJoin(files, eq(files.id, requestAttachments.fileId))
    .where(and(eq(requestAttachments.requestId, requestId), isNull(requestAttachments.messageId)))
  const [quote] = await ctx.db.select().from(quotes).where(eq(quotes.requestId, requestId)).limit(1)
  let quoteView: QuoteView | null = null
  if (quote) {
    const history = await revisionViews(ctx.db, quote.id)
    const current = history.find(h => h.revision === quote.currentRevision)!
    quoteView = { id: quote.id, status: quote.status, currentRevision: quote.currentRevision, expired: current.validUntil < isoDay(ctx.now()), current, history }
  }
  const [order] = await ctx.db.select({ id: orders.id }).from(orders).where(eq(orders.requestId, requestId)).limit(1)
  const side = sideOf(actor, request) ?? 'admin'
  return {
    id: request.id,
    side,
    title: request.title,
    status: request.status,
    racer: { id: request.racerId, name: extra!.racerName },
    shop: { id: extra!.shop.id, slug: extra!.shop.slug, shopName: extra!.shop.shopName, region: extra!.shop.region },
    build: build ?? null,
    targetHp: request.targetHp,
    targetTq: request.targetTq,
    targetStandard: request.targetStandard,
    displacementCapCi: request.displacementCapCi,
    fuel: request.fuel,
    aspiration: request.aspiration,
    intendedUse: request.intendedUse,
    transmission: request.transmission,
    launchRpm: request.launchRpm,
    stallRpm: request.stallRpm,
    shiftRpm: request.shiftRpm,
    budgetMinCents: request.budgetMinCents,
    budgetMaxCents: request.budgetMaxCents,
    deadline: request.deadline,
    notes: request.notes,
    attachments,
    createdAt: request.createdAt.toISOString(),
    quote: quoteView,
    orderId: order?.id ?? null,
    platformFeeBps: ctx.config.platformFeeBps,
  }
}

/** Each side's open requests, quotes and orders, newest activity first. */
export async function getDashboard(ctx: DealContext, actor: DealActor): Promise<DashboardView> {
  const side = actor.role === 'builder' ? 'builder' : actor.role === 'racer' ? 'racer' : 'admin'
  // An admin's desk is the deals with a dispute to settle; each party sees their own deals.
  const disputed = ctx.db.select({ requestId: orders.requestId }).from(milestones).innerJoin(orders, eq(orders.id, milestones.orderId)).where(eq(milestones.state, 'disputed'))
  const mine = side === 'builder' ? eq(quoteRequests.shopId, actor.shopId ?? 0) : side === 'racer' ? eq(quoteRequests.racerId, actor.id) : inArray(quoteRequests.id, disputed)
  const rows = await ctx.db.select({
    request: quoteRequests, racerName: users.name, shopName: shops.shopName, quote: quotes, orderId: orders.id,
  }).from(quoteRequests)
    .innerJoin(users, eq(users.id, quoteRequests.racerId))
    .innerJoin(shops, eq(shops.id, quoteRequests.shopId))
    .leftJoin(quotes, eq(quotes.requestId, quoteRequests.id))
    .leftJoin(orders, eq(orders.requestId, quoteRequests.id))
    .where(mine).orderBy(desc(quoteRequests.lastMessageAt)).limit(200)
  const unread = await unreadCounts(ctx.db, actor)
  const unreadOf = new Map(unread.threads.map(t => [t.requestId, t.unread]))
  const revisionIds = rows.filter(r => r.quote).map(r => r.quote!)
  const totals = revisionIds.length === 0
    ? []
    : await ctx.db.select({ quoteId: quoteRevisions.quoteId, revision: quoteRevisions.revision, total: quoteRevisions.totalCents }).from(quoteRevisions)
        .where(inArray(quoteRevisions.quoteId, revisionIds.map(q => q.id)))
  const toRow = (r: (typeof rows)[number]): DashboardRequestRow => ({
    id: r.request.id,
    title: r.request.title,
    status: r.request.status,
    counterparty: side === 'builder' ? r.racerName : r.shopName,
    lastMessageAt: r.request.lastMessageAt.toISOString(),
    unread: unreadOf.get(r.request.id) ?? 0,
    quoteTotalCents: r.quote ? (totals.find(t => t.quoteId === r.quote!.id && t.revision === r.quote!.currentRevision)?.total ?? null) : null,
    quoteStatus: r.quote?.status ?? null,
    orderId: r.orderId,
  })
  const requests = rows.filter(r => !r.quote && r.request.status === 'open').map(toRow)
  const quoted = rows.filter(r => r.quote && (r.quote.status === 'sent' || r.quote.status === 'declined')).map(toRow)
  const orderRows = rows.filter(r => r.orderId !== null)
  const plan = orderRows.length === 0
    ? []
    : await ctx.db.select().from(milestones).where(inArray(milestones.orderId, orderRows.map(r => r.orderId!))).orderBy(asc(milestones.position))
  const orderInfo = orderRows.length === 0 ? [] : await ctx.db.select().from(orders).where(inArray(orders.id, orderRows.map(r => r.orderId!)))
  const ordersOut: DashboardOrderRow[] = orderRows.map((r) => {
    const order = orderInfo.find(o => o.id === r.orderId)!
    const list = plan.filter(m => m.orderId === order.id)
    const next = list.find(m => !['released', 'refunded', 'cancelled'].includes(m.state))
    return {
      id: order.id,
      requestId: r.request.id,
      title: r.request.title,
      status: order.status,
      counterparty: side === 'builder' ? r.racerName : r.shopName,
      totalCents: order.totalCents,
      nextMilestone: next ? { id: next.id, title: next.title, state: next.state, amountCents: next.amountCents } : null,
      milestonesDone: list.filter(m => m.state === 'released').length,
      milestonesTotal: list.length,
      unread: unreadOf.get(r.request.id) ?? 0,
    }
  })
  return { side, requests, quotes: quoted, orders: ordersOut, unreadTotal: unread.total }
}
