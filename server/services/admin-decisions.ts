import { eq } from 'drizzle-orm'
import type { DecisionResult } from '../../shared/types/admin'
import { builds } from '../database/schema'
import type { AdminContext } from '../utils/admin'
import { adminEmails, type RenderedMail } from './mail-templates'
import { enqueueRendered } from './outbox'
import { reindexBuildAfterAdminChange } from './build-events'
import { unpublishBuild } from './moderation'
import { approvePull, rejectPull } from './verification'

export type { AdminContext } from '../utils/admin'

/** Queues the mail in the outbox once the decision has committed; a failure is logged and reported, never undoes the decision. */
async function tell(ctx: AdminContext, mail: { to: string } & RenderedMail): Promise<boolean> {
  try {
    await enqueueRendered(ctx.db, mail.to, mail)
    return true
  }
  catch (err) {
    console.error(`[mail] could not queue "${mail.subject}" for ${mail.to}: ${(err as Error).message}`)
    return false
  }
}

/** Verifies a pull (its e-mail to the shop goes through the outbox with the decision), then brings the search index in step. */
export async function approveEvidence(ctx: AdminContext, actorId: number, pullId: number, note?: string): Promise<DecisionResult> {
  const buildId = await approvePull(ctx.db, { actorId, pullId, note: note || null, siteUrl: ctx.siteUrl })
  await reindexBuildAfterAdminChange(buildId)
  const [build] = await ctx.db.select({ slug: builds.slug }).from(builds).where(eq(builds.id, buildId))
  return { pullId, status: 'verified', buildSlug: build?.slug ?? '', mailed: null }
}

/** Rejects a pull, queues the reason's e-mail to the shop, and brings the search index in step. */
export async function rejectEvidence(ctx: AdminContext, actorId: number, pullId: number, reason: string): Promise<DecisionResult> {
  const r = await rejectPull(ctx.db, { actorId, pullId, reason })
  await reindexBuildAfterAdminChange(r.buildId)
  const body = adminEmails.pullRejected({ name: r.name, pullLabel: r.pullLabel, buildTitle: r.buildTitle, reason, dashboardUrl: `${ctx.siteUrl}/dashboard` })
  const mailed = await tell(ctx, { to: r.email, ...body })
  return { pullId, status: 'rejected', buildSlug: r.buildSlug, mailed }
}

/** Takes a build down, queues the reason's e-mail to the shop, and takes it out of search. */
export async function takeDownBuild(ctx: AdminContext, actorId: number, buildId: number, reason: string): Promise<{ buildId: number, status: 'draft', mailed: boolean }> {
  const r = await unpublishBuild(ctx.db, { actorId, buildId, reason })
  await reindexBuildAfterAdminChange(buildId)
  const body = adminEmails.buildUnpublished({ name: r.name, buildTitle: r.buildTitle, reason, dashboardUrl: `${ctx.siteUrl}/dashboard` })
  const mailed = await tell(ctx, { to: r.email, ...body })
  return { buildId, status: 'draft', mailed }
}
