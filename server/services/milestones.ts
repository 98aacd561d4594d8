// The milestone lifecycle after funding: submitted with proof, approved (by the racer, or on its
// own after the configured days), released to the shop; disputed and settled by an admin; and
// cancelling an order, which refunds what is held. Every transition locks the order and the
// milestone and checks the current state first, so nothing is released or refunded twice.
import { and, asc, desc, eq, inArray, isNotNull, lte } from 'drizzle-orm'
import { isError } from 'h3'
import { readStored, type UploadStore } from '../utils/files'
import { blockingMilestone, MILESTONE_STATE_LABELS } from '../../shared/deals/constants'
import { evaluateDelivery } from '../../shared/deals/delivery'
import { formatCents } from '../../shared/money'
import { parsePull } from '../../shared/engine/parse'
import { isCorrectionStandard } from '../../shared/engine/correction'
import type { DeliveryPullFields, SubmitMilestoneInput } from '../../shared/schemas/deals'
import type { MilestoneView, OrderView } from '../../shared/types/deals'
import {
  shops, dealEvents, deliveryPulls, dynoPulls, files, milestoneProofs, milestones, orders, payments, quoteRequests,
  quoteRevisions, users, type Milestone, type Order,
} from '../database/schema'
import {
  type DealActor, type DealContext, type DbTransaction, conflict, forbidden, notFound, partiesOf, paymentServiceError, recordDealEvent,
  unprocessable,
} from './deal-context'
import { changeOrderOf } from './change-orders'
import { claimFiles } from './deal-files'
import { postEvent } from './deals'
import { writeAudit } from './audit'
import { enqueueMail } from './outbox'
import { assertParty, lockMilestone, markReleased, refundHeld, transferRelease } from './payments'
import { inRetriedTransaction, isLockConflict } from '../utils/transaction'

const link = (ctx: DealContext, orderId: number) => `${ctx.config.siteUrl}/deals/orders/${orderId}`

async function guaranteeOf(tx: DbTransaction, order: Order) {
  const [rev] = await tx.select().from(quoteRevisions).where(eq(quoteRevisions.id, order.revisionId)).limit(1)
  if (!rev || rev.guaranteeHp === null) return null
  return { hp: rev.guaranteeHp, tolerancePct: rev.guaranteeTolerancePct ?? 0, standard: rev.guaranteeStandard ?? 'SAE_J1349_2004' }
}

/**
 * Records a delivery pull for a milestone: parses the stored file, computes its figures under the
 * quoted standard with shared/engine, runs the evidence checks (including whether the same curve is
 * already on a build), and checks the request's displacement cap and the guarantee.
 */
export async function recordDeliveryPull(ctx: DealContext, storage: UploadStore, actor: DealActor, milestoneId: number, fileId: number, fields: DeliveryPullFields) {
  return inRetriedTransaction(ctx.db, async (tx) => {
    const { order, milestone } = await lockMilestone(tx, milestoneId)
    if (assertParty(actor, order) !== 'builder') throw forbidden('Only the shop sends a delivery pull.')
    if (milestone.state !== 'funded') throw conflict(`A delivery pull goes with a funded milestone before it is submitted; this one is ${milestone.state}.`)
    await claimFiles(tx, actor.id, [fileId], ['pull', 'attachment'])
    const [file] = await tx.select().from(files).where(eq(files.id, fileId)).limit(1)
    const raw = await readStored(storage, file!.storageKey)
    if (!raw) throw unprocessable('The pull file could not be read back; upload it again.')
    const parsed = parsePull(new Uint8Array(raw))
    if (!parsed.ok) throw unprocessable(`The pull file does not read as a dyno pull: ${parsed.errors.slice(0, 3).map(e => (e.row ? `row ${e.row}: ${e.message}` : e.message)).join('; ')}`)
    if (!isCorrectionStandard(fields.declaredStandard)) throw unprocessable('Pick one of the correction standards in the list.')
    const [request] = await tx.select().from(quoteRequests).where(eq(quoteRequests.id, order.requestId)).limit(1)
    const fingerprints = await tx.select({ buildId: dynoPulls.buildId, fingerprint: dynoPulls.fingerprint }).from(dynoPulls).where(isNotNull(dynoPulls.fingerprint))
    const report = evaluateDelivery({
      points: parsed.points, columns: parsed.columns, declaredStandard: fields.declaredStandard,
      weather: { baroInHg: fields.baroInHg, airTempF: fields.airTempF, humidityPct: fields.humidityPct },
      boreIn: fields.boreIn, strokeIn: fields.strokeIn, cylinders: fields.cylinders, aspiration: request!.aspiration,
      displacementCapCi: request!.displacementCapCi, guarantee: milestone.guaranteed ? await guaranteeOf(tx, order) : null,
      fingerprintsOfOtherBuilds: fingerprints.map(f => ({ buildId: f.buildId, fingerprint: f.fingerprint! })),
    })
    const { status, meetsTarget, ...stored } = report
    const [row] = await tx.insert(deliveryPulls).values({
      milestoneId, fileId, declaredStandard: fields.declaredStandard, baroInHg: fields.baroInHg, airTempF: fields.airTempF, humidityPct: fields.humidityPct,
      boreIn: fields.boreIn, strokeIn: fields.strokeIn, cylinders: fields.cylinders, report: stored, status, meetsTarget, createdAt: ctx.now(),
    }).$returningId()
    await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId, actorId: actor.id, action: 'delivery_pull', detail: `${status}, ${report.peakHp} hp under ${report.standard}${meetsTarget ? '' : ', below target'}` })
    return { id: row!.id, ...report }
  })
}

/** The shop marks a funded milestone done, with notes and proof; a guaranteed one needs a verified pull that meets the target. */
export async function submitMilestone(ctx: DealContext, actor: DealActor, milestoneId: number, input: SubmitMilestoneInput): Promise<void> {
  await inRetriedTransaction(ctx.db, async (tx) => {
    const { order, milestone } = await lockMilestone(tx, milestoneId)
    if (assertParty(actor, order) !== 'builder') throw forbidden('Only the shop submits a milestone.')
    if (order.status !== 'active') throw conflict(`This order is ${order.status}.`)
    if (milestone.state !== 'funded') throw conflict(milestone.state === 'awaiting_payment' ? 'This milestone is not paid yet: work is submitted against a held deposit.' : `This milestone is ${milestone.state}; only a funded milestone can be submitted.`)
    // Milestones are done in order (the order row is locked, so the earlier ones cannot move meanwhile).
    const siblings = await tx.select({ position: milestones.position, state: milestones.state, title: milestones.title }).from(milestones).where(eq(milestones.orderId, order.id))
    const blocking = blockingMilestone(siblings, milestone.position)
    if (blocking) throw conflict(`Milestones are done in order: "${blocking.title}" comes first and is not settled yet (${MILESTONE_STATE_LABELS[blocking.state].toLowerCase()}). Submit this one once the racer has approved it.`)
    if (milestone.guaranteed) {
      if (input.deliveryPullId === null) throw unprocessable('This milestone carries the power guarantee: send the delivery pull first, then submit with it.')
      const [pull] = await tx.select().from(deliveryPulls).where(and(eq(deliveryPulls.id, input.deliveryPullId), eq(deliveryPulls.milestoneId, milestoneId))).limit(1)
      if (!pull) throw unprocessable('That delivery pull does not belong to this milestone.')
      if (pull.status !== 'verified') throw unprocessable(`The delivery pull did not pass its checks: ${pull.report.reasons.join(' ')}`)
      if (!pull.meetsTarget) throw unprocessable(`The delivery pull makes ${pull.report.peakHp} hp under ${pull.report.standard}; the guarantee needs at least ${pull.report.minimumHp} hp.`)
    }
    const proofIds = await claimFiles(tx, actor.id, input.proofFileIds, ['proof', 'photo', 'attachment', 'pull'])
    if (proofIds.length > 0) await tx.insert(milestoneProofs).values(proofIds.map(fileId => ({ milestoneId, fileId })))
    const now = ctx.now()
    await tx.update(milestones).set({ state: 'submitted', submittedAt: now, submissionNotes: input.notes, deliveryPullId: input.deliveryPullId }).where(eq(milestones.id, milestoneId))
    await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId, actorId: actor.id, action: 'milestone_submitted', detail: input.notes.slice(0, 200) })
    await postEvent(tx, order.requestId, actor.id, `"${milestone.title}" was submitted for approval.`, now)
    const parties = await partiesOf(tx, order.requestId)
    await enqueueMail(tx, parties.racerEmail, {
      kind: 'milestone_submitted', racerName: parties.racerName, shopName: parties.shopName, milestone: milestone.title, autoApproveDays: ctx.config.autoApproveDays, link: link(ctx, order.id),
    }, `submitted:${milestoneId}:${now.getTime()}`)
  })
}

/** Approves under the lock; `notify: false` leaves the thread post and the e-mails to a caller that sends its own (a settled dispute). */
async function approveLocked(ctx: DealContext, tx: DbTransaction, order: Order, milestone: Milestone, actorId: number | null, automatic: boolean, notify = true) {
  const now = ctx.now()
  await tx.update(milestones).set({ state: 'approved', approvedAt: now, autoApproved: automatic }).where(eq(milestones.id, milestone.id))
  await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId: milestone.id, actorId, action: automatic ? 'milestone_auto_approved' : 'milestone_approved' })
  if (!notify) return
  await postEvent(tx, order.requestId, actorId, automatic ? `"${milestone.title}" was approved on its own after ${ctx.config.autoApproveDays} days.` : `"${milestone.title}" was approved.`, now)
  const parties = await partiesOf(tx, order.requestId)
  const mail = { kind: 'milestone_approved' as const, milestone: milestone.title, automatic, link: link(ctx, order.id) }
  await enqueueMail(tx, parties.racerEmail, { ...mail, recipientName: parties.racerName }, `approved:${milestone.id}:racer`)
  await enqueueMail(tx, parties.shopEmail, { ...mail, recipientName: parties.shopName }, `approved:${milestone.id}:builder`)
}

/**
 * Releases an approved milestone to the shop. Only `approved` can be released, under the lock, so a
 * second call (or one racing this) finds `released` and changes nothing; the transfer's idempotency
 * key makes a retry after a lost answer pay nothing twice.
 */
export async function releaseMilestone(ctx: DealContext, milestoneId: number): Promise<void> {
  await inRetriedTransaction(ctx.db, async (tx) => {
    const { order, milestone } = await lockMilestone(tx, milestoneId)
    if (milestone.state === 'released') throw conflict('This milestone has already been paid out.')
    if (milestone.state !== 'approved') throw conflict(`Only an approved milestone is paid out; this one is ${milestone.state.replace('_', ' ')}.`)
    let transfer
    try {
      transfer = await transferRelease(ctx, tx, order, milestone)
    }
    catch (e) {
      // A lock conflict is the database's, not the payment service's: it goes up as it is, to be run again.
      if (isError(e) || isLockConflict(e)) throw e
      throw paymentServiceError('pay out the milestone', e)
    }
    await markReleased(ctx, tx, order, milestone, transfer)
  })
}

/** Tries a release and reports instead of throwing: an approval stands even while the payout waits for a retry. */
async function tryRelease(ctx: DealContext, milestoneId: number): Promise<string | null> {
  try {
    await releaseMilestone(ctx, milestoneId)
    return null
  }
  catch (e) {
    return e instanceof Error ? e.message : String(e)
  }
}

/** The racer approves submitted work; the payout follows at once (or from the periodic task if the payment service is away). */
export async function approveMilestone(ctx: DealContext, actor: DealActor, milestoneId: number): Promise<{ released: boolean, problem: string | null }> {
  await inRetriedTransaction(ctx.db, async (tx) => {
    const { order, milestone } = await lockMilestone(tx, milestoneId)
    if (assertParty(actor, order) !== 'racer') throw forbidden('Only the racer approves a milestone.')
    if (milestone.state !== 'submitted') throw conflict(`Only submitted work can be approved; this milestone is ${milestone.state.replace('_', ' ')}.`)
    await approveLocked(ctx, tx, order, milestone, actor.id, false)
  })
  const problem = await tryRelease(ctx, milestoneId)
  return { released: problem === null, problem }
}

/** The racer disputes a funded or submitted milestone: the money stays held until an admin settles it. */
export async function disputeMilestone(ctx: DealContext, actor: DealActor, milestoneId: number, reason: string): Promise<void> {
  await inRetriedTransaction(ctx.db, async (tx) => {
    const { order, milestone } = await lockMilestone(tx, milestoneId)
    if (assertParty(actor, order) !== 'racer') throw forbidden('Only the racer opens a dispute.')
    if (milestone.state !== 'funded' && milestone.state !== 'submitted') throw conflict(`Only a funded or submitted milestone can be disputed; this one is ${milestone.state.replace('_', ' ')}.`)
    const now = ctx.now()
    await tx.update(milestones).set({ state: 'disputed', disputedAt: now, disputeReason: reason }).where(eq(milestones.id, milestoneId))
    await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId, actorId: actor.id, action: 'milestone_disputed', detail: reason })
    await postEvent(tx, order.requestId, actor.id, `${actor.name} disputed "${milestone.title}": ${reason} The deposit stays held until Torquewright settles it.`, now)
  })
}

/**
 * An admin settles a dispute: refund the racer, or approve and release to the shop. One transaction
 * holds the change, the refund at the payment service (by idempotency key), one audit row recording
 * before and after (the refund's id and amount when refunded), the history line, the note posted to
 * the thread and an e-mail with the note to each party. A release's payout follows as every payout
 * does (its own transaction and audit row), retried on its own if the payment service is away.
 */
export async function settleDispute(ctx: DealContext, actor: DealActor, milestoneId: number, outcome: 'refund' | 'release', note: string): Promise<{ state: Milestone['state'], problem: string | null }> {
  if (actor.role !== 'admin') throw forbidden('Only an admin settles a dispute.')
  const text = note.trim()
  if (!text) throw unprocessable('A dispute is settled with a note to both parties.')
  await inRetriedTransaction(ctx.db, async (tx) => {
    const { order, milestone } = await lockMilestone(tx, milestoneId)
    if (milestone.state !== 'disputed') throw conflict(`Only a disputed milestone is settled; this one is ${milestone.state.replace('_', ' ')}.`)
    const now = ctx.now()
    const parties = await partiesOf(tx, order.requestId)
    let after: Record<string, unknown>
    if (outcome === 'refund') {
      const refund = await refundHeld(ctx, tx, order, milestone, 'the dispute was settled in the racer\'s favour.', actor.id, { audit: false, notify: false })
      after = { state: 'refunded', outcome, refund: refund.id, amountCents: refund.amount }
    }
    else {
      await approveLocked(ctx, tx, order, milestone, actor.id, false, false)
      after = { state: 'approved', outcome, amountCents: milestone.amountCents }
    }
    await writeAudit(tx, {
      actorId: actor.id, action: 'dispute.settle', entityType: 'milestone', entityId: milestoneId,
      before: { state: milestone.state, amountCents: milestone.amountCents, disputeReason: milestone.disputeReason }, after, note: text, at: now,
    })
    await recordDealEvent(tx, { requestId: order.requestId, orderId: order.id, milestoneId, actorId: actor.id, action: 'dispute_settled', detail: `${outcome}: ${text}` })
    const amount = formatCents(milestone.amountCents)
    await postEvent(tx, order.requestId, actor.id, outcome === 'refund'
      ? `Torquewright settled the dispute over "${milestone.title}": the deposit of ${amount} is refunded to the racer. Note: ${text}`
      : `Torquewright settled the dispute over "${milestone.title}": the deposit of ${amount} is released to the shop. Note: ${text}`, now)
    const mail = { kind: 'dispute_settled' as const, shopName: parties.shopName, title: parties.title, milestone: milestone.title, outcome, amountCents: milestone.amountCents, note: text, link: link(ctx, order.id) }
    await enqueueMail(tx, parties.racerEmail, { ...mail, recipientName: parties.racerName, side: 'racer' }, `settled:${milestoneId}:racer`)
    await enqueueMail(tx, parties.shopEmail, { ...mail, recipientName: parties.shopName, side: 'builder' }, `settled:${milestoneId}:builder`)
  })
  const problem = outcome === 'release' ? await tryRelease(ctx, milestoneId) : null
  const [row] = await ctx.db.select({ state: milestones.state }).from(milestones).where(eq(milestones.id, milestoneId)).limit(1)
  return { state: row!.state, problem }
}

/**
 * Cancels an active order: unpaid milestones are cancelled (their open payment pages expired), held
 * ones refunded; released money stays with the shop. Refused while a payout is in progress.
 */
export async function cancelOrder(ctx: DealContext, actor: DealActor, orderId: number, reason: string): Promise<{ refundedCents: number }> {
  return inRetriedTransaction(ctx.db, async (tx) => {
    const [order] = await tx.select().from(orders).where(eq(orders.id, orderId)).limit(1).for('update')
    if (!order) throw notFound('That order')
    const side = assertParty(actor, order)
    if (side === 'admin') throw forbidden('An order is cancelled by one of its parties.')
    if (order.status !== 'active') throw conflict(`This order is already ${order.status}.`)
    const list = await tx.select().from(milestones).where(eq(milestones.orderId, orderId)).orderBy(asc(milestones.position)).for('update')
    if (list.some(m => m.state === 'approved')) throw conflict('A payout to the shop is in progress; try again in a minute.')
    const now = ctx.now()
    let refundedCents = 0
    for (const m of list) {
      if (m.state === 'awaiting_payment') {
        const open = await tx.select().from(payments).where(and(eq(payments.milestoneId, m.id), eq(payments.kind, 'checkout'), eq(payments.status, 'open')))
        for (const p of open) {
          // If the racer completes the page meanwhile, the completion event finds the milestone cancelled and refunds it.
          const expired = await ctx.stripe.checkout.sessions.expire(p.stripeCheckoutSessionId!, {}, { idempotencyKey: `${p.stripeCheckoutSessionId}-expire` }).then(() => true, () => false)
          if (expired) await tx.update(payments).set({ status: 'expired' }).where(eq(payments.id, p.id))
        }
        await tx.update(milestones).set({ state: 'cancelled' }).where(eq(milestones.id, m.id))
      }
      else if (m.state === 'funded' || m.state === 'submitted' || m.state === 'disputed') {
        await refundHeld(ctx, tx, order, m, `the order was cancelled (${reason})`, actor.id)
        refundedCents += m.amountCents
      }
    }
    await tx.update(orders).set({ status: 'cancelled', cancelledAt: now, cancelledBy: actor.id }).where(eq(orders.id, orderId))
    await writeAudit(tx, { actorId: actor.id, action: 'order.cancel', entityType: 'order', entityId: orderId, before: { status: order.status }, after: { status: 'cancelled', refundedCents }, note: reason })
    await recordDealEvent(tx, { requestId: order.requestId, orderId, actorId: actor.id, action: 'order_cancelled', detail: reason })
    await postEvent(tx, order.requestId, actor.id, `${actor.name} cancelled the order: ${reason}`, now)
    return { refundedCents }
  })
}

/** The periodic task: approves submissions the racer left unanswered for the configured days, and retries payouts that waited. */
export async function autoApproveDue(ctx: DealContext): Promise<{ approved: number, released: number, waiting: number }> {
  const cutoff = new Date(ctx.now().getTime() - ctx.config.autoApproveDays * 86_400_000)
  const due = await ctx.db.select({ id: milestones.id }).from(milestones).where(and(eq(milestones.state, 'submitted'), lte(milestones.submittedAt, cutoff)))
  let approved = 0
  for (const { id } of due) {
    const done = await inRetriedTransaction(ctx.db, async (tx) => {
      const { order, milestone } = await lockMilestone(tx, id)
      if (milestone.state !== 'submitted' || !milestone.submittedAt || milestone.submittedAt > cutoff) return false
      await approveLocked(ctx, tx, order, milestone, null, true)
      return true
    })
    if (done) approved++
  }
  const waiting = await ctx.db.select({ id: milestones.id }).from(milestones).where(eq(milestones.state, 'approved'))
  let released = 0
  for (const { id } of waiting) if ((await tryRelease(ctx, id)) === null) released++
  return { approved, released, waiting: waiting.length - released }
}

/** An order with its milestone tracker, payments (with their Stripe ids), documents and history, for its parties. */
export async function getOrderView(ctx: DealContext, actor: DealActor, orderId: number): Promise<OrderView> {
  const [row] = await ctx.db.select({ order: orders, request: quoteRequests, racerName: users.name, shop: shops }).from(orders)
    .innerJoin(quoteRequests, eq(quoteRequests.id, orders.requestId))
    .innerJoin(users, eq(users.id, orders.racerId))
    .innerJoin(shops, eq(shops.id, orders.shopId))
    .where(eq(orders.id, orderId)).limit(1)
  if (!row) throw notFound('That order')
  let side: OrderView['side']
  try {
    side = assertParty(actor, row.order)
  }
  catch {
    throw notFound('That order')
  }
  const { order } = row
  const [list, rev] = await Promise.all([
    ctx.db.select().from(milestones).where(eq(milestones.orderId, orderId)).orderBy(asc(milestones.position)),
    ctx.db.select().from(quoteRevisions).where(eq(quoteRevisions.id, order.revisionId)).limit(1),
  ])
  const ids = list.map(m => m.id)
  const [pays, proofs, pulls, events] = await Promise.all([
    ids.length ? ctx.db.select().from(payments).where(inArray(payments.milestoneId, ids)).orderBy(asc(payments.id)) : [],
    ids.length ? ctx.db.select({ milestoneId: milestoneProofs.milestoneId, id: files.id, name: files.originalName, mime: files.mime, sizeBytes: files.sizeBytes }).from(milestoneProofs).innerJoin(files, eq(files.id, milestoneProofs.fileId)).where(inArray(milestoneProofs.milestoneId, ids)) : [],
    ids.length ? ctx.db.select({ pull: deliveryPulls, fileName: files.originalName }).from(deliveryPulls).innerJoin(files, eq(files.id, deliveryPulls.fileId)).where(inArray(deliveryPulls.milestoneId, ids)).orderBy(desc(deliveryPulls.id)) : [],
    ctx.db.select({ e: dealEvents, actorName: users.name }).from(dealEvents).leftJoin(users, eq(users.id, dealEvents.actorId)).where(eq(dealEvents.requestId, order.requestId)).orderBy(asc(dealEvents.id)),
  ])
  const iso = (d: Date | null) => d?.toISOString() ?? null
  const views: MilestoneView[] = list.map((m) => {
    const mine = pays.filter(p => p.milestoneId === m.id)
    const pull = pulls.find(p => (m.deliveryPullId ? p.pull.id === m.deliveryPullId : p.pull.milestoneId === m.id))
    const open = mine.filter(p => p.kind === 'checkout' && p.status === 'open').at(-1)
    return {
      id: m.id, position: m.position, title: m.title, deliverable: m.deliverable, amountCents: m.amountCents, feeCents: m.feeCents, dueDate: m.dueDate,
      guaranteed: m.guaranteed, state: m.state, submissionNotes: m.submissionNotes, disputeReason: m.disputeReason, autoApproved: m.autoApproved,
      fundedAt: iso(m.fundedAt), submittedAt: iso(m.submittedAt), approvedAt: iso(m.approvedAt), releasedAt: iso(m.releasedAt), refundedAt: iso(m.refundedAt), disputedAt: iso(m.disputedAt),
      autoApproveAt: m.state === 'submitted' && m.submittedAt ? new Date(m.submittedAt.getTime() + ctx.config.autoApproveDays * 86_400_000).toISOString() : null,
      proofs: proofs.filter(p => p.milestoneId === m.id).map(({ milestoneId: _m, ...f }) => f),
      deliveryPull: pull
        ? { id: pull.pull.id, status: pull.pull.status, meetsTarget: pull.pull.meetsTarget, fileName: pull.fileName, report: pull.pull.report, createdAt: pull.pull.createdAt.toISOString() }
        : null,
      payments: mine.map(p => ({
        id: p.id, kind: p.kind, status: p.status, amountCents: p.amountCents, stripeCheckoutSessionId: p.stripeCheckoutSessionId,
        stripePaymentIntentId: p.stripePaymentIntentId, stripeChargeId: p.stripeChargeId, stripeRefundId: p.stripeRefundId,
        stripeTransferId: p.stripeTransferId, failureMessage: p.failureMessage, createdAt: p.createdAt.toISOString(),
      })),
      paymentProblem: open?.failureMessage ?? null,
    }
  })
  const sum = (kind: string) => pays.filter(p => p.kind === kind && p.status === 'succeeded').reduce((a, p) => a + p.amountCents, 0)
  const r = rev[0]
  const change = await changeOrderOf(ctx.db, order, list)
  return {
    id: order.id, side, status: order.status, requestId: order.requestId, title: row.request.title,
    racer: { id: order.racerId, name: row.racerName },
    shop: { id: row.shop.id, slug: row.shop.slug, shopName: row.shop.shopName },
    totalCents: order.totalCents, platformFeeCents: order.platformFeeCents, revision: r?.revision ?? 1,
    guarantee: r && r.guaranteeHp !== null ? { hp: r.guaranteeHp, tolerancePct: r.guaranteeTolerancePct ?? 0, standard: r.guaranteeStandard ?? 'SAE_J1349_2004' } : null,
    displacementCapCi: row.request.displacementCapCi,
    createdAt: order.createdAt.toISOString(), cancelledAt: iso(order.cancelledAt), completedAt: iso(order.completedAt),
    milestones: views,
    events: events.map(({ e, actorName }) => ({ id: e.id, action: e.action, detail: e.detail, actorName, milestoneId: e.milestoneId, createdAt: e.createdAt.toISOString() })),
    documents: views.flatMap(v => v.proofs),
    paidCents: sum('checkout'), releasedCents: sum('transfer'), refundedCents: sum('refund'),
    changeOrder: change.changeOrder,
    changeOrderAllowed: side === 'builder' && change.changeOrderAllowed,
  }
}
