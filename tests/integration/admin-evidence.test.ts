import { createHash } from 'node:crypto'
import { count, desc, eq, ne } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demoBuilds } from '../../scripts/lib/demo-data'
import type { EvidenceQueueItem, EvidenceReview } from '../../shared/types/admin'
import { freshAddress, json, makeAccount, PERSONAS, signedIn, signIn, waitForMail, type CookieJar } from '../support/auth'
import { api, baseUrl, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck, makeSubmittedPull, readTestUpload, shopOf } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
let admin: CookieJar
let adminId: number
beforeAll(async () => {
  ctx = await testDb()
  admin = await signedIn(PERSONAS.admin)
  adminId = (await ctx.db.select().from(schema.users).where(eq(schema.users.email, PERSONAS.admin)))[0]!.id
})
afterAll(async () => {
  await ctx.close()
})

const get = (path: string, jar: CookieJar | null = admin) => api(path, { headers: jar ? { cookie: jar.header() } : {} })
const post = (path: string, body: unknown, jar: CookieJar | null = admin) => api(path, json('POST', body, jar, freshAddress()))
const auditCount = async () => (await ctx.db.select({ n: count() }).from(schema.auditLog))[0]!.n
const pullRow = async (id: number) => (await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, id)))[0]!
const buildRow = async (id: number) => (await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id)))[0]!
const lastAudit = async () => (await ctx.db.select().from(schema.auditLog).orderBy(desc(schema.auditLog.id)).limit(1))[0]!

/** Every build and pull row except the ones a decision may change. */
async function everythingElse(buildId: number, pullId: number) {
  const otherBuilds = await ctx.db.select().from(schema.builds).where(ne(schema.builds.id, buildId)).orderBy(schema.builds.id)
  const otherPulls = await ctx.db.select().from(schema.dynoPulls).where(ne(schema.dynoPulls.id, pullId)).orderBy(schema.dynoPulls.id)
  return { otherBuilds, otherPulls }
}

describe('the evidence queue', () => {
  it('lists the seeded submitted pulls oldest first, the duplicate linked to the build whose curve it copies', async () => {
    const res = await get('/api/admin/evidence')
    expect(res.status).toBe(200)
    const queue = res.body as EvidenceQueueItem[]
    const submitted = await ctx.db.select({ n: count() }).from(schema.dynoPulls).where(eq(schema.dynoPulls.status, 'submitted'))
    expect(queue).toHaveLength(submitted[0]!.n)
    const times = queue.map(q => Date.parse(q.submittedAt))
    expect(times).toEqual([...times].sort((a, b) => a - b))

    // The demo scenario copies one earlier build's curve onto a later shop's submitted pull.
    const copied = demoBuilds().flatMap(b => b.pulls.filter(p => p.copiedFrom).map(p => ({ copy: b.slug, original: p.copiedFrom! })))
    expect(copied).toHaveLength(1)
    const item = queue.find(q => q.build.slug === copied[0]!.copy)!
    expect(item.outcome).toBe('fail')
    expect(item.flagged).toContainEqual({ id: 'duplicate-curve', outcome: 'fail' })
    expect(item.duplicate).toMatchObject({ slug: copied[0]!.original, outcome: 'fail', status: 'published' })
    expect(queue.filter(q => q.duplicate).map(q => q.pullId)).toEqual([item.pullId])
  })

  it('shows one pull with its raw file, curves, declared and recomputed figures, checks, combination and the matching build', async () => {
    const queue = (await get('/api/admin/evidence')).body as EvidenceQueueItem[]
    const item = queue.find(q => q.duplicate)!
    const res = await get(`/api/admin/evidence/${item.pullId}`)
    expect(res.status).toBe(200)
    const review = res.body as EvidenceReview
    const pull = await pullRow(item.pullId)
    const build = await buildRow(pull.buildId)
    const [file] = await ctx.db.select().from(schema.files).where(eq(schema.files.id, pull.fileId))
    const text = (await readTestUpload(file!.storageKey))!

    expect(review.file.preview.split('\n')[0]).toBe(text.split('\n')[0])
    expect(review.file.lines).toBe(pull.summary.points + 1)
    expect(review.file.sha256).toBe(file!.sha256)
    expect(review.curves[0]!.points).toHaveLength(pull.summary.points)
    // The seed declares the file's own peaks, so recomputing from the raw file must give them back.
    expect(review.recomputed.asFiled.peakHp).toBeCloseTo(pull.declaredPeakHp!, 1)
    expect(review.declared).toMatchObject({ peakHp: pull.declaredPeakHp, standard: pull.declaredStandard })
    expect(review.recomputed.normalised).toMatchObject({ standard: 'SAE_J1349_2004', peakHpRpm: pull.summary.peakHpRpm })
    expect(review.recomputed.normalised.peakHp).toBeCloseTo(pull.summary.peakHp, 1)
    expect(review.checks.map(c => c.id)).toEqual(pull.checks!.map(c => c.id))
    expect(review.combination).toMatchObject({ boreIn: build.boreIn, strokeIn: build.strokeIn, cylinders: build.cylinders, aspiration: build.aspiration })
    expect(review.combination.displacementCi).toBeCloseTo((Math.PI / 4) * build.boreIn! ** 2 * build.strokeIn! * build.cylinders!, 6)
    expect(review.build.shop.ownerEmail).toMatch(/@/)
    expect(review.duplicates[0]).toMatchObject({ slug: item.duplicate!.slug, outcome: 'fail' })
    expect(review.curves.at(-1)!.label).toContain(item.duplicate!.title)
  })

  it('hands out the raw file exactly as it was uploaded', async () => {
    const { pullId } = await makeBuildAwaitingCheck(ctx.db)
    const pull = await pullRow(pullId)
    const [file] = await ctx.db.select().from(schema.files).where(eq(schema.files.id, pull.fileId))
    const res = await fetch(`${baseUrl()}/api/admin/evidence/${pullId}/file`, { headers: { cookie: admin.header() } })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-disposition')).toContain('attachment')
    const bytes = Buffer.from(await res.arrayBuffer())
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(file!.sha256)
    expect((await get(`/api/admin/evidence/${pullId}/sheet`)).status).toBe(404)
  })
})

describe('verifying a pull over HTTP', () => {
  it('marks the pull and the build, sets the figures, writes one audit row and changes nothing else', async () => {
    const { pullId, buildId, slug, summary } = await makeBuildAwaitingCheck(ctx.db)
    expect((await api(`/api/builds/${slug}`)).body.verified).toBe(false)
    const before = { build: await buildRow(buildId), others: await everythingElse(buildId, pullId), audit: await auditCount() }

    const res = await post(`/api/admin/evidence/${pullId}/approve`, { note: 'Sheet, file and weather agree.' })
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ pullId, status: 'verified', buildSlug: slug, mailed: null })

    const pull = await pullRow(pullId)
    const build = await buildRow(buildId)
    expect(pull).toMatchObject({ status: 'verified', reviewNote: 'Sheet, file and weather agree.' })
    expect(build).toMatchObject({ ...before.build, verifiedAt: pull.reviewedAt, peakHp: summary.peakHp, peakHpRpm: summary.peakHpRpm, peakTq: summary.peakTq, peakTqRpm: summary.peakTqRpm, updatedAt: build.updatedAt })
    expect(await everythingElse(buildId, pullId)).toEqual(before.others)
    expect(await auditCount()).toBe(before.audit + 1)
    const audit = await lastAudit()
    expect(audit).toMatchObject({ action: 'pull.verify', actorId: adminId, entityType: 'dyno_pull', entityId: pullId, note: 'Sheet, file and weather agree.' })
    expect(audit.createdAt.getTime()).toBe(pull.reviewedAt!.getTime())

    const page = await api(`/api/builds/${slug}`)
    expect(page.body.verified).toBe(true)
    expect(page.body.pulls[0].status).toBe('verified')

    // The shop is told, once, through the outbox written with the decision.
    const [owner] = await ctx.db.select({ email: schema.users.email }).from(schema.builds)
      .innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
      .innerJoin(schema.users, eq(schema.users.id, schema.shops.userId)).where(eq(schema.builds.id, buildId))
    const label = pull.label
    const mail = await waitForMail(owner!.email, m => m.subject === `Dyno pull verified: ${label}`, 20_000)
    expect(mail.text).toContain(`/builds/${slug}`)
    const queued = await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.dedupeKey, `pull-verified:${pullId}`))
    expect(queued).toHaveLength(1)
    expect((await get('/api/admin/evidence')).body.some((q: EvidenceQueueItem) => q.pullId === pullId)).toBe(false)
  })

  it('refuses bad input with a 4xx that says what to fix, and writes nothing', async () => {
    const { pullId, buildId } = await makeBuildAwaitingCheck(ctx.db)
    const before = { pull: await pullRow(pullId), build: await buildRow(buildId), audit: await auditCount() }
    const short = await post(`/api/admin/evidence/${pullId}/reject`, { reason: 'bad' })
    expect(short.status).toBe(400)
    expect(short.body.message).toContain('at least 10 characters')
    expect((await post(`/api/admin/evidence/${pullId}/reject`, {})).body.message).toContain('reason')
    expect((await post(`/api/admin/evidence/${pullId}/reject`, { reason: 'The weather is from another day.', status: 'verified' })).status).toBe(400)
    expect((await post(`/api/admin/evidence/${pullId}/approve`, { note: 'x'.repeat(1001) })).status).toBe(400)
    expect((await post('/api/admin/evidence/abc/approve', {})).status).toBe(400)
    expect((await post('/api/admin/evidence/987654321/approve', {})).status).toBe(404)
    const broken = await api(`/api/admin/evidence/${pullId}/approve`, { method: 'POST', headers: { 'cookie': admin.header(), 'content-type': 'application/json' }, body: '{not json' })
    expect(broken.status).toBe(400)
    expect(await pullRow(pullId)).toEqual(before.pull)
    expect(await buildRow(buildId)).toEqual(before.build)
    expect(await auditCount()).toBe(before.audit)
  })

  it('answers 409 to a second decision on the same pull', async () => {
    const { pullId } = await makeBuildAwaitingCheck(ctx.db)
    expect((await post(`/api/admin/evidence/${pullId}/approve`, {})).status).toBe(200)
    const rows = await auditCount()
    const again = await post(`/api/admin/evidence/${pullId}/reject`, { reason: 'Changed my mind about the weather.' })
    expect(again.status).toBe(409)
    expect(again.body.message).toContain('already verified')
    expect(await auditCount()).toBe(rows)
  })

  it('refuses the shop that owns the pull, any other shop and racers (403), and anonymous visitors (401)', async () => {
    const owner = await makeAccount({ role: 'builder' })
    const shop = await shopOf(ctx.db, owner.id)
    const { pullId, buildId } = await makeBuildAwaitingCheck(ctx.db, { shopId: shop.id })
    const { jar: ownerJar } = await signIn('password', { email: owner.email, password: owner.password })
    const before = { pull: await pullRow(pullId), build: await buildRow(buildId) }
    for (const [jar, status] of [[ownerJar, 403], [await signedIn(PERSONAS.racer), 403], [await signedIn(PERSONAS.otherShop), 403], [null, 401]] as const) {
      expect((await post(`/api/admin/evidence/${pullId}/approve`, {}, jar)).status).toBe(status)
      expect((await post(`/api/admin/evidence/${pullId}/reject`, { reason: 'I would rather it were verified.' }, jar)).status).toBe(status)
      expect((await get(`/api/admin/evidence/${pullId}`, jar)).status).toBe(status)
      expect((await get(`/api/admin/evidence/${pullId}/file`, jar)).status).toBe(status)
    }
    expect(await pullRow(pullId)).toEqual(before.pull)
    expect(await buildRow(buildId)).toEqual(before.build)
  })
})

describe('rejecting a pull over HTTP', () => {
  it('records the reason, e-mails it to the shop and writes one audit row', async () => {
    const owner = await makeAccount({ role: 'builder', name: 'Odile Farrant' })
    const shop = await shopOf(ctx.db, owner.id)
    const { pullId, buildId, pullLabel } = await makeBuildAwaitingCheck(ctx.db, { shopId: shop.id })
    const before = { others: await everythingElse(buildId, pullId), audit: await auditCount() }
    const reason = 'The torque column stops at 6,100 rpm while the sheet runs to 7,000 rpm. Send the complete file.'

    const res = await post(`/api/admin/evidence/${pullId}/reject`, { reason })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ pullId, status: 'rejected', mailed: true })
    expect(await pullRow(pullId)).toMatchObject({ status: 'rejected', reviewNote: reason })
    expect(await buildRow(buildId)).toMatchObject({ verifiedAt: null, peakHp: null, status: 'published' })
    expect(await everythingElse(buildId, pullId)).toEqual(before.others)
    expect(await auditCount()).toBe(before.audit + 1)
    expect(await lastAudit()).toMatchObject({ action: 'pull.reject', actorId: adminId, entityId: pullId, note: reason })

    const mail = await waitForMail(owner.email, m => m.subject.includes(pullLabel))
    expect(mail.text).toContain('Hello Odile Farrant')
    expect(mail.text).toContain(reason)
    expect(mail.text).toMatch(/http:\/\/127\.0\.0\.1:\d+\/dashboard/)
  })

  it('a pull re-uploaded after a rejection starts a new review, with the rejection beside it', async () => {
    const { pullId, slug } = await makeBuildAwaitingCheck(ctx.db)
    const reason = 'The weather figures are from a different day than the pull.'
    expect((await post(`/api/admin/evidence/${pullId}/reject`, { reason })).status).toBe(200)
    const { pullId: again, buildId } = await makeSubmittedPull(ctx.db, slug)

    const queue = (await get('/api/admin/evidence')).body as EvidenceQueueItem[]
    expect(queue.some(q => q.pullId === pullId)).toBe(false)
    expect(queue.find(q => q.pullId === again)).toMatchObject({ earlierRejections: 1, build: { slug, verified: false } })
    const review = (await get(`/api/admin/evidence/${again}`)).body as EvidenceReview
    expect(review.pull.status).toBe('submitted')
    expect(review.history).toEqual([expect.objectContaining({ pullId, status: 'rejected', reviewNote: reason })])
    expect((await post(`/api/admin/evidence/${pullId}/approve`, {})).status).toBe(409)

    expect((await post(`/api/admin/evidence/${again}/approve`, {})).status).toBe(200)
    expect((await buildRow(buildId)).verifiedAt).not.toBeNull()
    expect((await api(`/api/builds/${slug}`)).body.verified).toBe(true)
  })
})
