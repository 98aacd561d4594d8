import { count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { displacementCi } from '../../shared/engine/geometry'
import { api, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

describe('GET /api/health', () => {
  it('answers ok when MariaDB answers', async () => {
    const res = await api('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ ok: true })
  })
})

describe('GET /api/builds', () => {
  it('lists the published builds read from MariaDB, newest first', async () => {
    const [published] = await ctx.db.select({ n: count() }).from(schema.builds).where(eq(schema.builds.status, 'published'))
    const res = await api('/api/builds?perPage=100')
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(published!.n)
    expect(res.body.items.length).toBeGreaterThanOrEqual(10)
    const dates = await ctx.db.select({ slug: schema.builds.slug, at: schema.builds.publishedAt }).from(schema.builds).where(eq(schema.builds.status, 'published'))
    const newest = [...dates].sort((a, b) => b.at!.getTime() - a.at!.getTime())[0]!
    expect(res.body.items[0].slug).toBe(newest.slug)
  })

  it('computes displacement from bore, stroke and cylinders rather than storing it', async () => {
    const res = await api('/api/builds?perPage=5')
    for (const item of res.body.items) {
      const [row] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.slug, item.slug))
      expect(item.displacementCi).toBeCloseTo(displacementCi(row!.boreIn!, row!.strokeIn!, row!.cylinders!), 6)
    }
  })

  it.each([
    ['perPage=0', 'perPage'],
    ['perPage=101', 'perPage'],
    ['page=abc', 'page'],
    ['page=-1', 'page'],
  ])('refuses %s with a 400 naming the parameter', async (query, field) => {
    const res = await api(`/api/builds?${query}`)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain(field)
  })
})

describe('GET /api/builds/:slug', () => {
  it('answers a published build with its parts list in order', async () => {
    const [row] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.status, 'published')).limit(1)
    const parts = await ctx.db.select().from(schema.buildParts).where(eq(schema.buildParts.buildId, row!.id))
    const res = await api(`/api/builds/${row!.slug}`)
    expect(res.status).toBe(200)
    expect(res.body.title).toBe(row!.title)
    expect(res.body.parts).toHaveLength(parts.length)
    expect(res.body.parts.map((p: { position: number }) => p.position)).toEqual([...parts.map(p => p.position)].sort((a, b) => a - b))
    expect(res.body.pulls.length).toBeGreaterThan(0)
  })

  it('hides a draft behind a 404', async () => {
    const [row] = await ctx.db.select().from(schema.builds).limit(1)
    const { id: _id, slug: _slug, createdAt: _c, updatedAt: _u, ...columns } = row!
    const slug = 'draft-only-for-this-test'
    await ctx.db.insert(schema.builds).values({ ...columns, slug, status: 'draft', publishedAt: null })
    try {
      const res = await api(`/api/builds/${slug}`)
      expect(res.status).toBe(404)
    }
    finally {
      await ctx.db.delete(schema.builds).where(eq(schema.builds.slug, slug))
    }
  })

  it('answers 404 for an unknown build and 400 for a malformed address', async () => {
    expect((await api('/api/builds/no-such-build')).status).toBe(404)
    const bad = await api('/api/builds/Not_A_Slug')
    expect(bad.status).toBe(400)
    expect(bad.body.message).toContain('slug')
  })
})

describe('GET /api/builders/:slug', () => {
  it('answers a shop with only its published builds', async () => {
    const [shop] = await ctx.db.select().from(schema.shops).limit(1)
    const published = await ctx.db.select().from(schema.builds).where(eq(schema.builds.shopId, shop!.id))
    const res = await api(`/api/builders/${shop!.slug}`)
    expect(res.status).toBe(200)
    expect(res.body.shopName).toBe(shop!.shopName)
    expect(res.body.builds).toHaveLength(published.filter(b => b.status === 'published').length)
  })

  it('answers 404 for an unknown shop', async () => {
    expect((await api('/api/builders/nobody-here')).status).toBe(404)
  })
})
