import { createError } from 'h3'
import { and, asc, eq } from 'drizzle-orm'
import { builderProfiles, builds, dynoPulls, users } from '../database/schema'
import type { Database } from '../database/types'
import { writeAudit } from './audit'

/** The admin's queue: submitted pulls, oldest first, with their build and shop. */
export async function evidenceQueue(db: Database) {
  return db.select({
    pullId: dynoPulls.id,
    label: dynoPulls.label,
    submittedAt: dynoPulls.createdAt,
    summary: dynoPulls.summary,
    checks: dynoPulls.checks,
    buildId: builds.id,
    buildSlug: builds.slug,
    buildTitle: builds.title,
    shopName: builderProfiles.shopName,
    shopSlug: builderProfiles.slug,
  }).from(dynoPulls)
    .innerJoin(builds, eq(builds.id, dynoPulls.buildId))
    .innerJoin(builderProfiles, eq(builderProfiles.id, builds.builderId))
    .where(eq(dynoPulls.status, 'submitted'))
    .orderBy(asc(dynoPulls.createdAt), asc(dynoPulls.id))
}

/** Locks a pull for a decision; 404 when missing, 409 when it is no longer awaiting one. */
async function lockSubmitted(tx: Parameters<Parameters<Database['transaction']>[0]>[0], pullId: number) {
  const [pull] = await tx.select().from(dynoPulls).where(eq(dynoPulls.id, pullId)).for('update')
  if (!pull) throw createError({ status: 404, message: 'No pull has that id.' })
  if (pull.status !== 'submitted') throw createError({ status: 409, message: `That pull was already ${pull.status}; only a pull awaiting a check can be decided.` })
  return pull
}

/**
 * Verifies a pull: the build gets its checked mark and its headline figures from this pull,
 * and one audit row records the change, all in one transaction. Returns the build id.
 */
export async function approvePull(db: Database, input: { actorId: number, pullId: number, note?: string | null }): Promise<number> {
  return db.transaction(async (tx) => {
    const pull = await lockSubmitted(tx, input.pullId)
    const [build] = await tx.select().from(builds).where(eq(builds.id, pull.buildId)).for('update')
    const now = new Date()
    await tx.update(dynoPulls).set({ status: 'verified', reviewNote: input.note ?? null, reviewedAt: now }).where(and(eq(dynoPulls.id, pull.id), eq(dynoPulls.status, 'submitted')))
    const figures = { peakHp: pull.summary.peakHp, peakHpRpm: pull.summary.peakHpRpm, peakTq: pull.summary.peakTq, peakTqRpm: pull.summary.peakTqRpm }
    await tx.update(builds).set({ ...figures, verifiedAt: build!.verifiedAt ?? now }).where(eq(builds.id, pull.buildId))
    await writeAudit(tx, {
      actorId: input.actorId,
      action: 'pull.verify',
      entityType: 'dyno_pull',
      entityId: pull.id,
      before: { status: pull.status, buildVerifiedAt: build!.verifiedAt?.toISOString() ?? null },
      after: { status: 'verified', ...figures },
      note: input.note ?? null,
    })
    return pull.buildId
  })
}

/** Rejects a pull with a reason the shop will read; one audit row. Returns what the e-mail to the shop needs. */
export async function rejectPull(db: Database, input: { actorId: number, pullId: number, reason: string }) {
  return db.transaction(async (tx) => {
    const pull = await lockSubmitted(tx, input.pullId)
    await tx.update(dynoPulls).set({ status: 'rejected', reviewNote: input.reason, reviewedAt: new Date() }).where(eq(dynoPulls.id, pull.id))
    await writeAudit(tx, {
      actorId: input.actorId,
      action: 'pull.reject',
      entityType: 'dyno_pull',
      entityId: pull.id,
      before: { status: pull.status },
      after: { status: 'rejected' },
      note: input.reason,
    })
    const [owner] = await tx.select({ email: users.email, name: users.name, buildTitle: builds.title, buildSlug: builds.slug })
      .from(builds)
      .innerJoin(builderProfiles, eq(builderProfiles.id, builds.builderId))
      .innerJoin(users, eq(users.id, builderProfiles.userId))
      .where(eq(builds.id, pull.buildId))
    return { buildId: pull.buildId, pullLabel: pull.label, ...owner! }
  })
}
