import { and, asc, count, eq, isNotNull } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { AdminOverview, AuditPage } from '../../shared/types/admin'
import { freshAddress, json, makeAccount, PERSONAS, signedIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
let admin: CookieJar
beforeAll(async () => {
  ctx = await testDb()
  admin = await signedIn(PERSONAS.admin)
})
afterAll(async () => {
  await ctx.close()
})

const get = (path: string) => api(path, { headers: { cookie: admin.header() } })
const post = (path: string, body: unknown) => api(path, json('POST', body, admin, freshAddress()))
const today = () => new Date().toISOString().slice(0, 10)

describe('the audit log page', () => {
  it('lists every privileged action newest first, with the actor, and filters by action, entity, actor and days', async () => {
    const { pullId } = await makeBuildAwaitingCheck(ctx.db)
    expect((await post(`/api/admin/evidence/${pullId}/reject`, { reason: 'The file is a copy of the sheet, not the raw data.' })).status).toBe(200)
    const racer = await makeAccount({ role: 'racer' })
    expect((await api(`/api/admin/users/${racer.id}`, json('PATCH', { suspended: true }, admin, freshAddress()))).status).toBe(200)

    const all = (await get('/api/admin/audit?perPage=100')).body as AuditPage
    const [{ n }] = await ctx.db.select({ n: count() }).from(schema.auditLog) as [{ n: number }]
    expect(all.total).toBe(n)
    const times = all.items.map(i => Date.parse(i.at))
    expect(times).toEqual([...times].sort((a, b) => b - a))
    expect(all.actions).toEqual(expect.arrayContaining(['pull.reject', 'account.suspend']))
    expect(all.entityTypes).toEqual(expect.arrayContaining(['dyno_pull', 'user']))

    const rejections = (await get('/api/admin/audit?action=pull.reject')).body as AuditPage
    expect(rejections.items.length).toBeGreaterThan(0)
    expect(rejections.items.every(i => i.action === 'pull.reject')).toBe(true)
    const one = (await get(`/api/admin/audit?entityType=dyno_pull&entityId=${pullId}`)).body as AuditPage
    expect(one.items).toHaveLength(1)
    expect(one.items[0]).toMatchObject({ action: 'pull.reject', entityId: pullId, actor: { email: PERSONAS.admin }, before: { status: 'submitted' }, after: { status: 'rejected' } })
    const suspended = (await get(`/api/admin/audit?entityType=user&entityId=${racer.id}`)).body as AuditPage
    expect(suspended.items.map(i => i.action)).toEqual(['account.suspend'])

    const byActor = (await get('/api/admin/audit?actor=admin%40torquewright&perPage=100')).body as AuditPage
    expect(byActor.items.length).toBeGreaterThan(0)
    expect(byActor.items.every(i => i.actor?.email === PERSONAS.admin)).toBe(true)
    const todays = (await get(`/api/admin/audit?from=${today()}&to=${today()}&perPage=100`)).body as AuditPage
    expect(todays.items.some(i => i.entityId === pullId)).toBe(true)
    expect(((await get('/api/admin/audit?from=2000-01-01&to=2000-01-31')).body as AuditPage).total).toBe(0)
  })

  it('pages through the rows', async () => {
    const first = (await get('/api/admin/audit?perPage=1&page=1')).body as AuditPage
    const second = (await get('/api/admin/audit?perPage=1&page=2')).body as AuditPage
    expect(first.items).toHaveLength(1)
    expect(second.items).toHaveLength(1)
    expect(first.items[0]!.id).not.toBe(second.items[0]!.id)
  })

  it('refuses filters it cannot read with a 400 naming the field', async () => {
    for (const [query, field] of [['from=01/02/2026', 'from'], ['to=2026-02-30', 'to'], ['from=2026-03-02&to=2026-03-01', 'from'], ['entityId=-4', 'entityId'], ['action=DROP%20TABLE', 'action'], ['perPage=1000', 'perPage']] as const) {
      const res = await get(`/api/admin/audit?${query}`)
      expect(res.status, query).toBe(400)
      expect(res.body.message, query).toContain(field)
    }
  })
})

describe('the admin dashboard figures', () => {
  it('counts the queue, the age of its oldest pull and the share of verified builds from the rows themselves', async () => {
    const res = await get('/api/admin/overview')
    expect(res.status).toBe(200)
    const o = res.body as AdminOverview
    const submitted = await ctx.db.select({ at: schema.dynoPulls.createdAt }).from(schema.dynoPulls).where(eq(schema.dynoPulls.status, 'submitted')).orderBy(asc(schema.dynoPulls.createdAt))
    expect(o.queue.length).toBe(submitted.length)
    expect(o.queue.oldestSubmittedAt).toBe(submitted[0]!.at.toISOString())
    const ageHours = (Date.now() - submitted[0]!.at.getTime()) / 3_600_000
    expect(Math.abs(o.queue.oldestAgeHours! - ageHours)).toBeLessThan(0.1)
    const [{ n: published }] = await ctx.db.select({ n: count() }).from(schema.builds).where(eq(schema.builds.status, 'published')) as [{ n: number }]
    const [{ n: verified }] = await ctx.db.select({ n: count() }).from(schema.builds).where(and(eq(schema.builds.status, 'published'), isNotNull(schema.builds.verifiedAt))) as [{ n: number }]
    expect(o.builds).toEqual({ published, verified, verifiedShare: verified / published })
  })
})
