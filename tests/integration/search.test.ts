import { and, eq, inArray, isNotNull, ne } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { displacementCi } from '../../shared/engine/geometry'
import { PERSONAS, signedIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
let admin: CookieJar
beforeAll(async () => {
  ctx = await testDb()
  admin = await signedIn(PERSONAS.admin)
  // The index is built at start; wait until it holds the seeded builds.
  for (let i = 0; i < 50; i++) {
    if ((await api('/api/search?perPage=1')).body?.total > 0) break
    await new Promise(r => setTimeout(r, 200))
  }
  // Other files' fixtures write builds straight to MariaDB, behind the index; the consistency check
  // (which also runs on a timer in the app) brings the index level with the table before counting.
  expect((await check()).status).toBe(200)
})
afterAll(async () => {
  await ctx.close()
})

/** The test-mode hook the build editor's writes stand in for (admins only). */
const sync = (buildId: number) => api('/api/testing/search/sync', { method: 'POST', headers: { 'content-type': 'application/json', 'cookie': admin.header() }, body: JSON.stringify({ buildId }) })
const check = () => api('/api/testing/search/check', { method: 'POST', headers: { cookie: admin.header() } })
const published = () => ctx.db.select().from(schema.builds).where(eq(schema.builds.status, 'published'))

describe('GET /api/search over the seeded builds', () => {
  it('holds every published build, each hit with the fields the page shows', async () => {
    const rows = await published()
    const res = await api('/api/search?perPage=100')
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(rows.length)
    const hit = res.body.hits[0]
    for (const key of ['slug', 'title', 'shop', 'displacementCi', 'peakHp', 'peakHpRpm', 'peakTq', 'peakTqRpm', 'aspiration', 'fuel', 'verified', 'priceCents']) {
      expect(hit).toHaveProperty(key)
    }
    expect(hit.shop).toEqual({ slug: expect.any(String), name: expect.any(String) })
  })

  it('filters by displacement computed from bore, stroke and cylinders', async () => {
    const rows = await published()
    const cis = rows.map(r => ({ slug: r.slug, ci: displacementCi(r.boreIn!, r.strokeIn!, r.cylinders!) }))
    const res = await api('/api/search?ciMin=400&ciMax=500&perPage=100')
    expect(res.status).toBe(200)
    const expected = cis.filter(c => c.ci >= 400 && c.ci <= 500).map(c => c.slug).sort()
    expect(res.body.hits.map((h: { slug: string }) => h.slug).sort()).toEqual(expected)
    expect(expected.length).toBeGreaterThan(0)
  })

  it('ORs repeated values within a field and ANDs the fields, with facets that add up to the total', async () => {
    const rows = await published()
    const res = await api('/api/search?aspiration=na&aspiration=turbo&fuel=e85&perPage=100')
    const expected = rows.filter(r => ['na', 'turbo'].includes(r.aspiration!) && r.fuel === 'e85')
    expect(res.body.total).toBe(expected.length)
    for (const counts of Object.values(res.body.facets) as Record<string, number>[]) {
      expect(Object.values(counts).reduce((a, b) => a + b, 0)).toBe(res.body.total)
    }
    expect(res.body.facets.fuel.e85).toBe(expected.length)
  })

  it('keeps only builds with verified evidence when asked', async () => {
    const rows = await published()
    const res = await api('/api/search?verified=true&perPage=100')
    expect(res.body.total).toBe(rows.filter(r => r.verifiedAt !== null).length)
    expect(res.body.hits.every((h: { verified: boolean }) => h.verified)).toBe(true)
  })

  it('recomputes peak power from the raw pull under SAE J1349 (2004), matching the stored headline figures', async () => {
    const res = await api('/api/search?verified=true&perPage=100')
    for (const hit of res.body.hits.slice(0, 10)) {
      const [row] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.slug, hit.slug))
      expect(hit.peakHp).toBeCloseTo(row!.peakHp!, 0)
    }
  })

  it('answers band averages and sorts by them, and finds a typo', async () => {
    const res = await api('/api/search?bandFrom=4000&bandTo=6000&sort=band&perPage=100')
    expect(res.status).toBe(200)
    const averages = res.body.hits.map((h: { bandAvgHp: number | null }) => h.bandAvgHp).filter((a: number | null) => a !== null)
    expect(averages.length).toBeGreaterThan(5)
    expect(averages).toEqual([...averages].sort((a: number, b: number) => b - a))
    const exact = await api('/api/search?q=supercharged')
    const typo = await api('/api/search?q=supercharjed%20')
    expect(exact.body.total).toBeGreaterThan(0)
    expect(typo.body.total).toBe(exact.body.total)
  })
})

describe('GET /api/search refuses bad parameters with a 400 naming the reason', () => {
  it.each([
    ['ciMin=abc', 'ciMin'],
    ['ciMin=500&ciMax=400', 'ciMin is above ciMax'],
    ['hpMin=-5', 'hpMin'],
    ['aspiration=jet', 'aspiration is one of'],
    ['fuel=diesel', 'fuel is one of'],
    ['use=flying', 'use is one of'],
    ['sort=target', 'sort=target needs hpTarget'],
    ['sort=band', 'sort=band needs bandFrom and bandTo'],
    ['sort=loudest', 'sort is one of'],
    ['bandFrom=3000', 'a band needs both'],
    ['bandFrom=6000&bandTo=5000', 'bandTo'],
    ['bandFrom=500&bandTo=5000', 'bandFrom is at least 1000'],
    ['hpTolerance=20', 'hpTolerance needs hpTarget'],
    ['verified=yes', 'verified is true or false'],
    ['perPage=101', 'perPage'],
    ['page=0', 'page'],
    ['page=200&perPage=100', 'page × perPage'],
    ['colour=red', 'unknown parameter colour'],
    [`q=${'x'.repeat(201)}`, 'q is at most 200'],
  ])('%s', async (query, reason) => {
    const res = await api(`/api/search?${query}`)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain(reason)
  })
})

describe('keeping the index in step with MariaDB', () => {
  it('publish, edit, verify and unpublish change the results at once', async () => {
    const [source] = await ctx.db.select().from(schema.builds).where(and(eq(schema.builds.status, 'published'), ne(schema.builds.aspiration, 'nitrous'))).limit(1)
    const { id: _id, slug: _slug, createdAt: _c, updatedAt: _u, ...columns } = source!
    const slug = 'search-sync-test-build'
    const [row] = await ctx.db.insert(schema.builds).values({ ...columns, slug, title: 'Quillback stroker for the sync test', status: 'draft', publishedAt: null, verifiedAt: null }).$returningId()
    const id = row!.id
    try {
      expect((await sync(id)).body.result).toBe('absent')
      expect((await api('/api/search?q=quillback')).body.total).toBe(0)

      await ctx.db.update(schema.builds).set({ status: 'published', publishedAt: new Date() }).where(eq(schema.builds.id, id))
      expect((await sync(id)).body.result).toBe('indexed')
      const found = await api('/api/search?q=quillback')
      expect(found.body.hits.map((h: { slug: string }) => h.slug)).toEqual([slug])
      expect(found.body.hits[0].verified).toBe(false)
      expect(found.body.hits[0].peakHp).toBeNull()

      await ctx.db.update(schema.builds).set({ title: 'Marrowfin stroker for the sync test', aspiration: 'nitrous' }).where(eq(schema.builds.id, id))
      await sync(id)
      expect((await api('/api/search?q=quillback')).body.total).toBe(0)
      const edited = await api('/api/search?q=marrowfin&aspiration=nitrous')
      expect(edited.body.hits.map((h: { slug: string }) => h.slug)).toEqual([slug])

      expect((await api('/api/search?q=marrowfin&verified=true')).body.total).toBe(0)
      await ctx.db.update(schema.builds).set({ verifiedAt: new Date() }).where(eq(schema.builds.id, id))
      await sync(id)
      expect((await api('/api/search?q=marrowfin&verified=true')).body.total).toBe(1)

      await ctx.db.update(schema.builds).set({ status: 'archived' }).where(eq(schema.builds.id, id))
      expect((await sync(id)).body.result).toBe('removed')
      expect((await api('/api/search?q=marrowfin')).body.total).toBe(0)
    }
    finally {
      await ctx.db.delete(schema.builds).where(eq(schema.builds.id, id))
      await sync(id)
    }
  })

  it('a verified pull gives the build its recomputed figures and curve in the index', async () => {
    const [build] = await ctx.db.select().from(schema.builds).where(and(eq(schema.builds.status, 'published'), isNotNull(schema.builds.verifiedAt))).limit(1)
    await sync(build!.id)
    const res = await api(`/api/search?ciMin=${displacementCi(build!.boreIn!, build!.strokeIn!, build!.cylinders!) - 0.001}&ciMax=${displacementCi(build!.boreIn!, build!.strokeIn!, build!.cylinders!) + 0.001}&bandFrom=4000&bandTo=5000`)
    const hit = res.body.hits.find((h: { slug: string }) => h.slug === build!.slug)
    expect(hit.peakHp).toBeGreaterThan(0)
    expect(hit.bandAvgHp).toBeGreaterThan(0)
    expect(hit.bandAvgHp).toBeLessThanOrEqual(hit.peakHp)
  })

  it('the consistency check finds drift made behind the index\'s back and repairs it', async () => {
    const [victim] = await published()
    const original = victim!.title
    await ctx.db.update(schema.builds).set({ title: 'Driftwood combination nobody synced' }).where(eq(schema.builds.id, victim!.id))
    try {
      expect((await api('/api/search?q=driftwood')).body.total).toBe(0)
      const checked = await check()
      expect(checked.status).toBe(200)
      expect(checked.body.updated).toBeGreaterThanOrEqual(1)
      expect((await api('/api/search?q=driftwood')).body.hits.map((h: { slug: string }) => h.slug)).toEqual([victim!.slug])
      const again = await check()
      expect(again.body).toMatchObject({ added: 0, updated: 0, removed: 0 })
    }
    finally {
      await ctx.db.update(schema.builds).set({ title: original }).where(eq(schema.builds.id, victim!.id))
      await sync(victim!.id)
    }
  })

  it('refuses the sync hook to a stranger (401) and to a racer (403)', async () => {
    expect((await api('/api/testing/search/sync', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ buildId: 1 }) })).status).toBe(401)
    const racer = await signedIn(PERSONAS.racer)
    expect((await api('/api/testing/search/sync', { method: 'POST', headers: { 'content-type': 'application/json', 'cookie': racer.header() }, body: JSON.stringify({ buildId: 1 }) })).status).toBe(403)
  })

  it('refuses a bad sync request with a 400 and writes nothing', async () => {
    const res = await api('/api/testing/search/sync', { method: 'POST', headers: { 'content-type': 'application/json', 'cookie': admin.header() }, body: JSON.stringify({ buildId: 'seven' }) })
    expect(res.status).toBe(400)
    expect(res.body.message).toContain('buildId')
  })
})

describe('GET /api/builders/for-target', () => {
  it('ranks shops by their verified builds near the target', async () => {
    const rows = (await published()).filter(r => r.verifiedAt !== null && r.peakHp !== null)
    const pick = rows[0]!
    const ci = displacementCi(pick.boreIn!, pick.strokeIn!, pick.cylinders!)
    const res = await api(`/api/builders/for-target?ci=${ci.toFixed(1)}&hp=${pick.peakHp}&aspiration=${pick.aspiration}`)
    expect(res.status).toBe(200)
    expect(res.body.shops.length).toBeGreaterThan(0)
    const [shop] = await ctx.db.select().from(schema.shops).where(eq(schema.shops.id, pick.shopId))
    expect(res.body.shops.map((s: { shop: { slug: string } }) => s.shop.slug)).toContain(shop!.slug)
    const scores = res.body.shops.map((s: { score: number }) => s.score)
    expect(scores).toEqual([...scores].sort((a: number, b: number) => b - a))
    const near = rows.filter(r => r.aspiration === pick.aspiration && Math.abs(displacementCi(r.boreIn!, r.strokeIn!, r.cylinders!) - ci) <= 0.1 * ci && Math.abs(r.peakHp! - pick.peakHp!) <= 0.15 * pick.peakHp!)
    const shopIds = await ctx.db.select().from(schema.shops).where(inArray(schema.shops.id, near.map(r => r.shopId)))
    expect(res.body.shops.length).toBe(Math.min(5, shopIds.length))
  })

  it('keeps the racer\'s displacement range (never a build outside it) and says so in the window', async () => {
    const rows = (await published()).filter(r => r.verifiedAt !== null && r.peakHp !== null)
    const pick = rows[0]!
    const ci = displacementCi(pick.boreIn!, pick.strokeIn!, pick.cylinders!)
    const [ciMin, ciMax] = [Math.floor(ci), Math.ceil(ci * 1.08)]
    const res = await api(`/api/builders/for-target?ciMin=${ciMin}&ciMax=${ciMax}&hp=${pick.peakHp}`)
    expect(res.status).toBe(200)
    expect(res.body.window.ciMin).toBe(ciMin)
    expect(res.body.window.ciMax).toBe(ciMax)
    const shown = res.body.shops.flatMap((s: { closest: { displacementCi: number }[] }) => s.closest.map(c => c.displacementCi))
    expect(shown.length).toBeGreaterThan(0)
    for (const d of shown) {
      expect(d).toBeGreaterThanOrEqual(ciMin)
      expect(d).toBeLessThanOrEqual(ciMax)
    }
    const bad = await api('/api/builders/for-target?ciMin=450&ciMax=400&hp=700')
    expect(bad.status).toBe(400)
    expect(bad.body.message).toContain('ciMin is above ciMax')
  })

  it.each([
    ['hp=700', 'ci (the displacement) is required'],
    ['ci=427', 'hp (the power target) is required'],
    ['ci=427&hp=700&fuel=kerosene', 'fuel is one of'],
    ['ci=abc&hp=700', 'ci is a number'],
    ['ci=427&hp=700&limit=500', 'limit is at most 50'],
  ])('refuses %s with a 400', async (query, reason) => {
    const res = await api(`/api/builders/for-target?${query}`)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain(reason)
  })
})
