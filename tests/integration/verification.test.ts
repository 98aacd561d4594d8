import { and, count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { approvePull, evidenceQueue, evidenceReview, rejectPull } from '../../server/services/verification'
import type { Database } from '../../server/database/types'
import { schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck, makeSubmittedPull, readTestUpload, seededUser } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
let db: Database
beforeAll(async () => {
  ctx = await testDb()
  db = ctx.db as unknown as Database
})
afterAll(async () => {
  await ctx.close()
})

const auditRows = async (pullId: number) => ctx.db.select().from(schema.auditLog)
  .where(and(eq(schema.auditLog.entityType, 'dyno_pull'), eq(schema.auditLog.entityId, pullId)))
const auditCount = async () => ((await ctx.db.select({ n: count() }).from(schema.auditLog))[0]!.n)
const pullRow = async (id: number) => (await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, id)))[0]!
const buildRow = async (id: number) => (await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id)))[0]!
/** No such account: the audit row's actor reference fails, which must undo the whole decision. */
const NO_SUCH_ACTOR = 987_654_321

describe('evidence decisions (service, real MariaDB)', () => {
  it('lists submitted pulls oldest first, including the seeded duplicate with a failing check', async () => {
    const queue = await evidenceQueue(db)
    expect(queue.length).toBeGreaterThanOrEqual(2)
    const times = queue.map(q => Date.parse(q.submittedAt))
    expect(times).toEqual([...times].sort((a, b) => a - b))
    const duplicate = queue.find(q => q.flagged.some(c => c.id === 'duplicate-curve' && c.outcome === 'fail'))
    expect(duplicate?.duplicate).not.toBeNull()
  })

  it('approving marks the pull verified, gives the build its figures and writes exactly one audit row at the same moment', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const { pullId, buildId } = await makeBuildAwaitingCheck(ctx.db)
    const pullBefore = await pullRow(pullId)
    const returned = await approvePull(db, { actorId: admin.id, pullId })
    expect(returned).toBe(buildId)
    const pull = await pullRow(pullId)
    const build = await buildRow(buildId)
    expect(pull.status).toBe('verified')
    expect(build.verifiedAt).not.toBeNull()
    expect(build.peakHp).toBeCloseTo(pullBefore.summary.peakHp, 1)
    const audit = await auditRows(pullId)
    expect(audit).toHaveLength(1)
    expect(audit[0]).toMatchObject({ action: 'pull.verify', actorId: admin.id, before: { status: 'submitted', buildVerifiedAt: null }, after: { status: 'verified' } })
    expect(audit[0]!.createdAt.getTime()).toBe(pull.reviewedAt!.getTime())
    expect(build.verifiedAt!.getTime()).toBe(pull.reviewedAt!.getTime())
  })

  it('refuses to decide a pull twice (409) and writes no second audit row', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const { pullId } = await makeSubmittedPull(ctx.db)
    await approvePull(db, { actorId: admin.id, pullId })
    await expect(approvePull(db, { actorId: admin.id, pullId })).rejects.toMatchObject({ statusCode: 409 })
    await expect(rejectPull(db, { actorId: admin.id, pullId, reason: 'late' })).rejects.toMatchObject({ statusCode: 409 })
    expect(await auditRows(pullId)).toHaveLength(1)
  })

  it('rejecting records the reason and the audit row together; a verified build keeps its figures', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const { pullId, buildId, build } = await makeSubmittedPull(ctx.db)
    const result = await rejectPull(db, { actorId: admin.id, pullId, reason: 'The file ends at 5,200 rpm but the sheet shows 7,000.' })
    expect(result.email).toMatch(/@/)
    const pull = await pullRow(pullId)
    const after = await buildRow(buildId)
    expect(pull.status).toBe('rejected')
    expect(pull.reviewNote).toContain('5,200')
    expect(after).toMatchObject({ peakHp: build.peakHp, peakTq: build.peakTq, verifiedAt: build.verifiedAt })
    const audit = await auditRows(pullId)
    expect(audit.map(a => a.action)).toEqual(['pull.reject'])
    expect(audit[0]!.after).not.toHaveProperty('buildFigures')
  })

  it('rejecting the only pull of an unverified build takes its headline figures off it', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const { pullId, buildId } = await makeBuildAwaitingCheck(ctx.db)
    const before = await buildRow(buildId)
    await rejectPull(db, { actorId: admin.id, pullId, reason: 'The curve belongs to another engine.' })
    const after = await buildRow(buildId)
    expect(after).toMatchObject({ peakHp: null, peakHpRpm: null, peakTq: null, peakTqRpm: null, verifiedAt: null, status: 'published' })
    const [audit] = await auditRows(pullId)
    expect(audit!.before).toMatchObject({ buildFigures: { peakHp: before.peakHp } })
    expect(audit!.after).toMatchObject({ buildFigures: { peakHp: null } })
  })

  it('is all or nothing: when the audit row cannot be written, the pull and the build stay as they were', async () => {
    const { pullId, buildId } = await makeBuildAwaitingCheck(ctx.db)
    const [pullBefore, buildBefore, rows] = [await pullRow(pullId), await buildRow(buildId), await auditCount()]
    await expect(approvePull(db, { actorId: NO_SUCH_ACTOR, pullId })).rejects.toThrow()
    await expect(rejectPull(db, { actorId: NO_SUCH_ACTOR, pullId, reason: 'The sheet and the file disagree.' })).rejects.toThrow()
    expect(await pullRow(pullId)).toEqual(pullBefore)
    expect(await buildRow(buildId)).toEqual(buildBefore)
    expect(await auditCount()).toBe(rows)
  })

  it('answers 404 for a pull that does not exist and writes nothing', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const before = await auditCount()
    await expect(approvePull(db, { actorId: admin.id, pullId: 987654321 })).rejects.toMatchObject({ statusCode: 404 })
    await expect(evidenceReview(db, readTestUpload, 987654321)).rejects.toMatchObject({ statusCode: 404 })
    expect(await auditCount()).toBe(before)
  })
})
