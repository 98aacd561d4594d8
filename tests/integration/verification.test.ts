import { and, count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { approvePull, evidenceQueue, rejectPull } from '../../server/services/verification'
import type { Database } from '../../server/database/types'
import { schema, testDb } from '../support/context'
import { makeSubmittedPull, seededUser } from '../support/fixtures'

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

describe('evidence decisions (service, real MariaDB)', () => {
  it('lists submitted pulls oldest first, including the seeded duplicate with a failing check', async () => {
    const queue = await evidenceQueue(db)
    expect(queue.length).toBeGreaterThanOrEqual(2)
    const times = queue.map(q => q.submittedAt.getTime())
    expect(times).toEqual([...times].sort((a, b) => a - b))
    const duplicate = queue.find(q => q.checks?.some(c => c.id === 'duplicate-curve' && c.outcome === 'fail'))
    expect(duplicate).toBeDefined()
  })

  it('approving marks the pull verified, gives the build its figures and writes exactly one audit row', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const { pullId, buildId } = await makeSubmittedPull(ctx.db)
    const [pullBefore] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, pullId))
    const returned = await approvePull(db, { actorId: admin.id, pullId })
    expect(returned).toBe(buildId)
    const [pull] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, pullId))
    const [build] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, buildId))
    expect(pull!.status).toBe('verified')
    expect(build!.verifiedAt).not.toBeNull()
    expect(build!.peakHp).toBeCloseTo(pullBefore!.summary.peakHp, 1)
    const audit = await auditRows(pullId)
    expect(audit).toHaveLength(1)
    expect(audit[0]!.action).toBe('pull.verify')
    expect(audit[0]!.actorId).toBe(admin.id)
    expect(audit[0]!.before).toMatchObject({ status: 'submitted' })
  })

  it('refuses to decide a pull twice (409) and writes no second audit row', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const { pullId } = await makeSubmittedPull(ctx.db)
    await approvePull(db, { actorId: admin.id, pullId })
    await expect(approvePull(db, { actorId: admin.id, pullId })).rejects.toMatchObject({ statusCode: 409 })
    await expect(rejectPull(db, { actorId: admin.id, pullId, reason: 'late' })).rejects.toMatchObject({ statusCode: 409 })
    expect(await auditRows(pullId)).toHaveLength(1)
  })

  it('rejecting records the reason and the audit row together, and leaves the build untouched', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const { pullId, buildId, build } = await makeSubmittedPull(ctx.db)
    const result = await rejectPull(db, { actorId: admin.id, pullId, reason: 'The file ends at 5,200 rpm but the sheet shows 7,000.' })
    expect(result.email).toMatch(/@/)
    const [pull] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, pullId))
    const [after] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, buildId))
    expect(pull!.status).toBe('rejected')
    expect(pull!.reviewNote).toContain('5,200')
    expect(after!.peakHp).toBe(build.peakHp)
    const audit = await auditRows(pullId)
    expect(audit.map(a => a.action)).toEqual(['pull.reject'])
  })

  it('answers 404 for a pull that does not exist and writes nothing', async () => {
    const admin = await seededUser(ctx.db, 'admin')
    const [{ n: before }] = await ctx.db.select({ n: count() }).from(schema.auditLog) as [{ n: number }]
    await expect(approvePull(db, { actorId: admin.id, pullId: 987654321 })).rejects.toMatchObject({ statusCode: 404 })
    const [{ n: after }] = await ctx.db.select({ n: count() }).from(schema.auditLog) as [{ n: number }]
    expect(after).toBe(before)
  })
})
