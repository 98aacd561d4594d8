// A shop's rename reaches every instance: PATCH /api/builders/[slug] writes a change for each of the
// shop's builds to the change feed in its own transaction (read here as another instance reads it, from
// a pool of its own), and this instance's search shows the new name at once. A refused or bad rename
// writes nothing to the feed.
import { randomBytes } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Database } from '../../server/database/types'
import { createFeedReader, feedHead } from '../../server/services/search-feed'
import { as, makeAccount, signIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck } from '../support/fixtures'
import { buildIds, removeBuildsSince } from '../support/builds'

let ctx: Awaited<ReturnType<typeof testDb>>
/** A pool of its own: another server instance as far as MariaDB can tell. */
let other: { db: Database, close: () => Promise<void> }
let seeded: Set<number>
beforeAll(async () => {
  ctx = await testDb()
  const pool = mysql.createPool({ uri: inject('databaseUrl'), connectionLimit: 2, timezone: 'Z' })
  other = { db: drizzle(pool, { schema, mode: 'default' }), close: () => pool.end() }
  seeded = await buildIds(ctx.db)
})
afterAll(async () => {
  await removeBuildsSince(ctx.db, seeded)
  await other.close()
  await ctx.close()
})

const address = '10.80.0.1'
const rename = (jar: CookieJar, slug: string, body: unknown) =>
  api(`/api/builders/${slug}`, { method: 'PATCH', headers: as(jar, address, { 'content-type': 'application/json' }), body: JSON.stringify(body) })

/** The builds of `ids` among those a poll of the feed handed out (other files' writes share the feed). */
const ofShop = (polled: number[], ids: number[]) => polled.filter(id => ids.includes(id)).sort((a, b) => a - b)

async function shopWithBuilds(count: number) {
  const account = await makeAccount({ role: 'builder', name: 'Renaming shop' })
  const [shop] = await ctx.db.select().from(schema.shops).where(eq(schema.shops.slug, account.shopSlug!))
  const builds = []
  for (let i = 0; i < count; i++) builds.push(await makeBuildAwaitingCheck(ctx.db, { shopId: shop!.id, title: `Renamed shop build ${randomBytes(3).toString('hex')}` }))
  const { code, jar } = await signIn('password', { email: account.email, password: account.password })
  expect(code).toBeNull()
  return { slug: account.shopSlug!, shopId: shop!.id, builds, jar }
}

describe('a shop\'s rename in the change feed', () => {
  it('carries a change for each of the shop\'s builds, and this instance\'s search shows the new name', async () => {
    const shop = await shopWithBuilds(2)
    const ids = shop.builds.map(b => b.buildId).sort((a, b) => a - b)
    const reader = createFeedReader(other.db, await feedHead(ctx.db))
    expect(ofShop(await reader.poll(), ids)).toEqual([])

    const name = `Renamed Works ${randomBytes(3).toString('hex')}`
    const res = await rename(shop.jar, shop.slug, { shopName: name })
    expect(res.status).toBe(200)
    expect(res.body.shopName).toBe(name)
    expect(ofShop(await reader.poll(), ids)).toEqual(ids)

    // This instance re-indexed the builds after the commit: its search names the shop as it now is.
    const found = await api(`/api/search?q=${encodeURIComponent(shop.builds[0]!.title)}&perPage=5`)
    expect(found.status).toBe(200)
    const hit = found.body.hits.find((h: { slug: string }) => h.slug === shop.builds[0]!.slug)
    expect(hit?.shop.name).toBe(name)
  })

  it('writes nothing to the feed for a refused or a bad rename, and leaves the name as it was', async () => {
    const shop = await shopWithBuilds(1)
    const stranger = await shopWithBuilds(0)
    const [before] = await ctx.db.select({ name: schema.shops.shopName }).from(schema.shops).where(eq(schema.shops.id, shop.shopId))
    const reader = createFeedReader(other.db, await feedHead(ctx.db))
    expect((await rename(stranger.jar, shop.slug, { shopName: 'Not Their Shop' })).status).toBe(403)
    expect((await rename(shop.jar, shop.slug, { shopName: '' })).status).toBe(400)
    expect((await rename(shop.jar, shop.slug, {})).status).toBe(400)
    expect(ofShop(await reader.poll(), [shop.builds[0]!.buildId])).toEqual([])
    const [after] = await ctx.db.select({ name: schema.shops.shopName }).from(schema.shops).where(eq(schema.shops.id, shop.shopId))
    expect(after!.name).toBe(before!.name)
  })

  it('a shop with no builds renames too (no feed rows to write)', async () => {
    const shop = await shopWithBuilds(0)
    expect((await rename(shop.jar, shop.slug, { region: 'Far Valley' })).status).toBe(200)
    const [row] = await ctx.db.select({ region: schema.shops.region }).from(schema.shops).where(eq(schema.shops.id, shop.shopId))
    expect(row!.region).toBe('Far Valley')
  })
})
