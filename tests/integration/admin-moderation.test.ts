import { count, desc, eq, ne } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { unpublishBuild } from '../../server/services/moderation'
import type { Database } from '../../server/database/types'
import type { AdminBuildRow } from '../../shared/types/admin'
import type { Page } from '../../shared/types/builds'
import { freshAddress, json, makeAccount, PERSONAS, signedIn, signIn, waitForMail, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck, shopOf } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
let admin: CookieJar
beforeAll(async () => {
  ctx = await testDb()
  admin = await signedIn(PERSONAS.admin)
})
afterAll(async () => {
  await ctx.close()
})

const get = (path: string, jar: CookieJar | null = admin) => api(path, { headers: jar ? { cookie: jar.header() } : {} })
const post = (path: string, body: unknown, jar: CookieJar | null = admin) => api(path, json('POST', body, jar, freshAddress()))
const auditCount = async () => (await ctx.db.select({ n: count() }).from(schema.auditLog))[0]!.n
const buildRow = async (id: number) => (await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id)))[0]!
const otherBuilds = (id: number) => ctx.db.select().from(schema.builds).where(ne(schema.builds.id, id)).orderBy(schema.builds.id)

describe('taking a build down', () => {
  it('makes it a draft, hides it from the public, e-mails the reason to the shop and writes one audit row', async () => {
    const owner = await makeAccount({ role: 'builder', name: 'Wendell Ostrow' })
    const shop = await shopOf(ctx.db, owner.id)
    const { buildId, slug, title } = await makeBuildAwaitingCheck(ctx.db, { shopId: shop.id })
    expect((await api(`/api/builds/${slug}`)).status).toBe(200)
    const before = { others: await otherBuilds(buildId), audit: await auditCount(), build: await buildRow(buildId) }
    const reason = 'The parts list names a cylinder head this shop does not sell; correct it before publishing again.'

    const res = await post(`/api/admin/listings/${buildId}/unpublish`, { reason })
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ buildId, status: 'draft', mailed: true })
    const after = await buildRow(buildId)
    expect(after).toMatchObject({ ...before.build, status: 'draft', updatedAt: after.updatedAt })
    expect(await otherBuilds(buildId)).toEqual(before.others)
    expect((await api(`/api/builds/${slug}`)).status).toBe(404)
    expect(await auditCount()).toBe(before.audit + 1)
    const [audit] = await ctx.db.select().from(schema.auditLog).orderBy(desc(schema.auditLog.id)).limit(1)
    expect(audit).toMatchObject({ action: 'listing.unpublish', entityType: 'build', entityId: buildId, before: { status: 'published' }, after: { status: 'draft' }, note: reason })
    expect(audit!.createdAt.getTime()).toBe(after.updatedAt.getTime())

    const mail = await waitForMail(owner.email, m => m.subject.includes(title))
    expect(mail.text).toContain(reason)
    expect(mail.text).toContain('Hello Wendell Ostrow')

    const list = (await get(`/api/admin/listings?q=${encodeURIComponent(slug)}`)).body as Page<AdminBuildRow>
    expect(list.items).toHaveLength(1)
    expect(list.items[0]).toMatchObject({ id: buildId, status: 'draft', lastUnpublished: { reason } })

    const again = await post(`/api/admin/listings/${buildId}/unpublish`, { reason })
    expect(again.status).toBe(409)
    expect(await auditCount()).toBe(before.audit + 1)
  })

  it('needs a reason a shop can act on, and writes nothing without one', async () => {
    const { buildId } = await makeBuildAwaitingCheck(ctx.db)
    const before = { build: await buildRow(buildId), audit: await auditCount() }
    expect((await post(`/api/admin/listings/${buildId}/unpublish`, {})).status).toBe(400)
    const short = await post(`/api/admin/listings/${buildId}/unpublish`, { reason: 'spam' })
    expect(short.status).toBe(400)
    expect(short.body.message).toContain('at least 10 characters')
    expect((await post(`/api/admin/listings/${buildId}/unpublish`, { reason: 42 })).status).toBe(400)
    expect((await post('/api/admin/listings/0/unpublish', { reason: 'A reason long enough to read.' })).status).toBe(400)
    expect(await buildRow(buildId)).toEqual(before.build)
    expect(await auditCount()).toBe(before.audit)
  })

  it('refuses the build\'s own shop, other shops and racers (403) and anonymous visitors (401)', async () => {
    const owner = await makeAccount({ role: 'builder' })
    const shop = await shopOf(ctx.db, owner.id)
    const { buildId } = await makeBuildAwaitingCheck(ctx.db, { shopId: shop.id })
    const { jar: ownerJar } = await signIn('password', { email: owner.email, password: owner.password })
    const before = await buildRow(buildId)
    for (const [jar, status] of [[ownerJar, 403], [await signedIn(PERSONAS.shop), 403], [await signedIn(PERSONAS.racer), 403], [null, 401]] as const) {
      expect((await post(`/api/admin/listings/${buildId}/unpublish`, { reason: 'Taking my rival down for no reason.' }, jar)).status).toBe(status)
      expect((await get('/api/admin/listings', jar)).status).toBe(status)
    }
    expect(await buildRow(buildId)).toEqual(before)
  })

  it('is all or nothing: when the audit row cannot be written the build stays published', async () => {
    const { buildId } = await makeBuildAwaitingCheck(ctx.db)
    const before = await buildRow(buildId)
    await expect(unpublishBuild(ctx.db as unknown as Database, { actorId: 987_654_321, buildId, reason: 'A reason long enough to read.' })).rejects.toThrow()
    expect(await buildRow(buildId)).toEqual(before)
  })
})

describe('the builds list for moderation', () => {
  it('shows every status, filters by status and searches title, address and shop', async () => {
    const all = (await get('/api/admin/listings?perPage=100')).body as Page<AdminBuildRow>
    const [{ n }] = await ctx.db.select({ n: count() }).from(schema.builds) as [{ n: number }]
    expect(all.total).toBe(n)
    const published = (await get('/api/admin/listings?status=published&perPage=100')).body as Page<AdminBuildRow>
    expect(published.items.length).toBeGreaterThan(0)
    expect(published.items.every(r => r.status === 'published')).toBe(true)
    const byShop = (await get('/api/admin/listings?q=Harrow%20Creek&perPage=100')).body as Page<AdminBuildRow>
    expect(byShop.items.length).toBeGreaterThan(0)
    expect(byShop.items.every(r => r.shop.shopName === 'Harrow Creek Engine Works')).toBe(true)
    const seeded = byShop.items.find(r => r.slug === 'harrow-362-na-race-gas-1')!
    expect(seeded.pulls.verified).toBeGreaterThanOrEqual(1)
    expect((await get(`/api/admin/listings?q=${encodeURIComponent('%')}`)).body.total).toBe(0)
    expect((await get('/api/admin/listings?perPage=500')).status).toBe(400)
  })
})
