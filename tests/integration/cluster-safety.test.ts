// What running several server instances on one Galera cluster relies on, checked on the single test
// node: every table has a primary key and is InnoDB (Galera replicates InnoDB rows only and needs a
// key for each row: MariaDB's Galera documentation, "Known Limitations"), the change feed is read by
// independent readers without missing a change committed out of order, the running server reads it,
// a saved-search alert is written once however many instances see the change, and the uploads driver
// that keeps files in MariaDB stores, lists and removes them.
import { randomBytes } from 'node:crypto'
import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { and, eq, inArray, sql } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { createStorage } from 'unstorage'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { createSearchIndex } from '../../search/index'
import { syntheticDocuments } from '../../search/synthetic'
import type { Database } from '../../server/database/types'
import { autoApproveDue, submitMilestone } from '../../server/services/milestones'
import { announceBuild } from '../../server/services/saved-searches'
import { createFeedReader, feedHead, recordBuildChange } from '../../server/services/search-feed'
import { approvePull } from '../../server/services/verification'
import { mariadbStorage } from '../../server/utils/mariadb-storage'
import { as, makeAccount, signIn } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { dealTestContext, fundMilestone, makeOrder, milestoneRow } from '../support/deals'
import { makeBuildAwaitingCheck, seededUser } from '../support/fixtures'
import { eventually } from '../support/payments'

let ctx: Awaited<ReturnType<typeof testDb>>
/** Connection pools of their own: other server instances as far as MariaDB can tell. */
let other: { db: Database, close: () => Promise<void> }
let third: { db: Database, close: () => Promise<void> }
const instance = () => {
  const pool = mysql.createPool({ uri: inject('databaseUrl'), connectionLimit: 4, timezone: 'Z' })
  return { db: drizzle(pool, { schema, mode: 'default' }), close: () => pool.end() }
}
beforeAll(async () => {
  ctx = await testDb()
  other = instance()
  third = instance()
})
afterAll(async () => {
  await other.close()
  await third.close()
  await ctx.close()
})

const searchFor = (q: string) => api(`/api/search?q=${encodeURIComponent(q)}&perPage=5`)

describe('tables fit for Galera', () => {
  it('every table of the schema has a primary key and the InnoDB engine', async () => {
    const [tables] = await ctx.db.execute(sql`
      select t.table_name as name, t.engine as engine,
        (select count(*) from information_schema.table_constraints c
          where c.table_schema = t.table_schema and c.table_name = t.table_name and c.constraint_type = 'PRIMARY KEY') as pk
      from information_schema.tables t where t.table_schema = database() and t.table_type = 'BASE TABLE'`) as unknown as [{ name: string, engine: string, pk: number }[]]
    expect(tables.length).toBeGreaterThan(20)
    expect(tables.filter(t => Number(t.pk) !== 1).map(t => t.name)).toEqual([])
    expect(tables.filter(t => t.engine !== 'InnoDB').map(t => `${t.name} (${t.engine})`)).toEqual([])
  })

  it('no server code or migration takes a named lock or asks for another engine', () => {
    const root = resolve(import.meta.dirname, '..', '..')
    const offending: string[] = []
    const walk = (dir: string) => {
      for (const name of readdirSync(dir)) {
        const path = join(dir, name)
        if (statSync(path).isDirectory()) walk(path)
        else if (/\.(ts|sql)$/.test(name) && /\b(GET_LOCK|RELEASE_LOCK|MyISAM|ENGINE\s*=\s*(?!InnoDB))/i.test(readFileSync(path, 'utf8'))) offending.push(path.slice(root.length + 1))
      }
    }
    walk(resolve(root, 'server'))
    expect(offending).toEqual([])
  })
})

describe('the change feed', () => {
  it('gives two readers every change once, a change that commits after a later one included', async () => {
    const start = await feedHead(ctx.db)
    // The readers' pools are not the writer's connection, so they see only what has committed.
    const first = createFeedReader(third.db, start)
    const second = createFeedReader(other.db, start)
    const [a, b] = [900_000_000 + Math.floor(Math.random() * 1000), 910_000_000 + Math.floor(Math.random() * 1000)]
    // Transaction A takes its position first and holds it open; B takes the next one and commits first.
    let releaseA!: () => void
    const held = new Promise<void>((r) => {
      releaseA = r
    })
    let positionTaken!: () => void
    const aHasPosition = new Promise<void>((r) => {
      positionTaken = r
    })
    const txA = ctx.db.transaction(async (tx) => {
      await recordBuildChange(tx, a)
      positionTaken()
      await held
    })
    await aHasPosition
    await other.db.transaction(tx => recordBuildChange(tx, b))
    const seenEarly = [await first.poll(), await second.poll()]
    expect(seenEarly).toEqual([[b], [b]])
    releaseA()
    await txA
    const seenLate = [await first.poll(), await second.poll()]
    expect(seenLate).toEqual([[a], [a]])
    // Nothing is handed out twice, and the floor has not passed the rows still inside the settle window.
    expect([await first.poll(), await second.poll()]).toEqual([[], []])
    expect(first.floor).toBe(start)
  })

  it('writes nothing for a change that rolls back', async () => {
    const start = await feedHead(ctx.db)
    const reader = createFeedReader(ctx.db, start)
    await expect(ctx.db.transaction(async (tx) => {
      await recordBuildChange(tx, 920_000_000)
      throw new Error('rolled back on purpose')
    })).rejects.toThrow('rolled back on purpose')
    expect(await reader.poll()).toEqual([])
  })

  it('brings the running server\'s index in step with a change written by another instance (the feed alone, no hook)', async () => {
    const tag = `zf${randomBytes(3).toString('hex')}`
    // Inserted straight into MariaDB, as another instance's write would be: this server's own hook never runs.
    const build = await makeBuildAwaitingCheck(ctx.db, { title: `Feed probe ${tag}` })
    await ctx.db.transaction(tx => recordBuildChange(tx, build.buildId))
    // The bound is a guard against a hang (the feed is read every 250 ms; the consistency check runs every five minutes).
    const found = await eventually('the build in the server\'s search', async () => {
      const res = await searchFor(tag)
      return res.body?.total === 1 ? res.body : undefined
    }, 5000)
    expect(found.hits[0].slug).toBe(build.slug)

    await ctx.db.update(schema.builds).set({ status: 'archived' }).where(eq(schema.builds.id, build.buildId))
    await other.db.transaction(tx => recordBuildChange(tx, build.buildId))
    await eventually('the archived build out of the server\'s search', async () => (await searchFor(tag)).body?.total === 0, 5000)
  })

  it('drops this server\'s cached public answer for a build another instance changed (the feed alone, no hook)', async () => {
    const tag = `zc${randomBytes(3).toString('hex')}`
    const build = await makeBuildAwaitingCheck(ctx.db, { title: `Cache probe ${tag}` })
    const titleOf = async () => {
      const res = await api(`/api/builds/${build.slug}`)
      expect(res.status).toBe(200)
      return (res.body as { title: string }).title
    }
    // Anonymous answers are cached (server/utils/public-cache.ts): a write this server never hears of stays unseen...
    expect(await titleOf()).toBe(`Cache probe ${tag}`)
    await ctx.db.update(schema.builds).set({ title: `Cache probe ${tag} renamed` }).where(eq(schema.builds.id, build.buildId))
    expect(await titleOf()).toBe(`Cache probe ${tag}`)
    // ...until another instance's feed row reaches it. The bound guards against a hang (the feed is read every 250 ms; the cache lives 60 s).
    await other.db.transaction(tx => recordBuildChange(tx, build.buildId))
    await eventually('the renamed build in the anonymous answer', async () => (await titleOf()) === `Cache probe ${tag} renamed` || undefined, 5000)
  })
})

describe('a saved-search alert with several instances', () => {
  it('is written and mailed once when the server and two more instances all announce the same verified build', async () => {
    const tag = `zs${randomBytes(3).toString('hex')}`
    const build = await makeBuildAwaitingCheck(ctx.db, { title: `Alert probe ${tag}` })
    const saver = await makeAccount({ role: 'racer', name: `Alert saver ${tag}` })
    const { code, jar } = await signIn('password', { email: saver.email, password: saver.password })
    expect(code).toBeNull()
    const saved = await api('/api/me/searches', {
      method: 'POST', headers: as(jar, '10.77.1.1', { 'content-type': 'application/json' }), body: JSON.stringify({ name: `Alert ${tag}`, query: { q: tag } }),
    })
    expect(saved.status).toBe(201)

    // Verified through the service on this side: the feed row goes with the decision, and the server announces from the feed.
    const admin = await seededUser(ctx.db, 'admin')
    await approvePull(ctx.db, { actorId: admin.id, pullId: build.pullId, siteUrl: 'http://127.0.0.1' })
    // Two more instances, each with its own index and pool, announce at the same moment.
    // Their indexes hold the build as verified under its title (an invented document otherwise: only the text and the mark are matched here).
    const indexOf = () => {
      const index = createSearchIndex()
      index.build([{ ...syntheticDocuments(1)[0]!, id: build.buildId, slug: build.slug, title: build.title, summary: '', verified: true }])
      return index
    }
    const [ia, ib] = [indexOf(), indexOf()]
    expect(ia.matches(build.buildId, { q: tag })).toBe(true)
    const results = await Promise.all([announceBuild(ctx.db, ia, build.buildId, 'http://127.0.0.1'), announceBuild(other.db, ib, build.buildId, 'http://127.0.0.1')])
    // The server reads the feed too; wait until its index has the build verified, so its attempt is over or sees the row.
    await eventually('the server\'s index to show the build verified', async () => (await api(`/api/search?q=${tag}&verified=true`)).body?.total === 1, 5000)
    await new Promise(r => setTimeout(r, 500))

    const rows = await ctx.db.select().from(schema.savedSearchAnnouncements)
      .where(and(eq(schema.savedSearchAnnouncements.buildId, build.buildId), eq(schema.savedSearchAnnouncements.savedSearchId, saved.body.id)))
    expect(rows).toHaveLength(1)
    const mails = (await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.toAddress, saver.email))).filter(m => m.dedupeKey?.startsWith('saved-search:'))
    expect(mails).toHaveLength(1)
    // At most one of the two test instances wrote it (none when the server was first).
    expect(results.reduce((n, r) => n + r.announced, 0)).toBeLessThanOrEqual(1)
    await ctx.db.delete(schema.savedSearches).where(inArray(schema.savedSearches.id, [saved.body.id]))
  })
})

describe('automatic approvals with several instances', () => {
  it('approves and pays out a due milestone once when two instances run the approvals at the same moment', async () => {
    const [one, two] = await Promise.all([dealTestContext(), dealTestContext()])
    try {
      const { racer, shop, milestones } = await makeOrder(one.ctx)
      const m = milestones[0]!
      await fundMilestone(one.ctx, racer, m.id)
      await submitMilestone(one.ctx, shop, m.id, { notes: 'Done.', proofFileIds: [], deliveryPullId: null })
      const due = new Date((await milestoneRow(one.db, m.id)).submittedAt!.getTime() + 8 * 86_400_000)
      const runs = await Promise.all([autoApproveDue({ ...one.ctx, now: () => due }), autoApproveDue({ ...two.ctx, now: () => due })])
      // Other due milestones of earlier tests may be approved here too; this one counts once between the two runs.
      expect(runs.reduce((n, r) => n + r.approved, 0)).toBeGreaterThanOrEqual(1)
      expect((await milestoneRow(one.db, m.id)).state).toBe('released')
      const events = await ctx.db.select().from(schema.dealEvents).where(eq(schema.dealEvents.milestoneId, m.id))
      expect(events.filter(e => e.action === 'milestone_auto_approved')).toHaveLength(1)
      expect(events.filter(e => e.action === 'milestone_released')).toHaveLength(1)
      const transfers = (await ctx.db.select().from(schema.payments).where(eq(schema.payments.milestoneId, m.id))).filter(p => p.kind === 'transfer')
      expect(transfers).toHaveLength(1)
      const mails = await ctx.db.select().from(schema.mailOutbox).where(inArray(schema.mailOutbox.dedupeKey, [`approved:${m.id}:racer`, `approved:${m.id}:builder`]))
      expect(mails).toHaveLength(2)
    }
    finally {
      await Promise.all([one.close(), two.close()])
    }
  })
})

describe('uploads kept in MariaDB', () => {
  it('stores bytes, reads them back unchanged, lists by prefix (LIKE characters taken literally) and removes them', async () => {
    // Mounted as the app mounts it (server/plugins/storage.ts).
    const driver = mariadbStorage({ db: () => ctx.db })
    const storage = createStorage()
    storage.mount('uploads', driver)
    const tag = randomBytes(4).toString('hex')
    const key = (rest: string) => `uploads:t${tag}${rest}`
    const bytes = Buffer.from([0, 1, 2, 250, 255, 10, 13])
    await storage.setItemRaw(key(':pull:a_1.csv'), bytes)
    await storage.setItemRaw(key(':photo:b%2.png'), Buffer.from('second'))
    await storage.setItemRaw(key('x:other.txt'), Buffer.from('not under the prefix'))
    const back = await storage.getItemRaw(key(':pull:a_1.csv'))
    expect(Buffer.compare(Buffer.from(back as Uint8Array), bytes)).toBe(0)
    expect(await storage.hasItem(key(':photo:b%2.png'))).toBe(true)
    expect((await storage.getKeys(`uploads:t${tag}`)).sort()).toEqual([key(':photo:b%2.png'), key(':pull:a_1.csv')])
    // Writing a key again replaces its bytes.
    await storage.setItemRaw(key(':photo:b%2.png'), Buffer.from('replaced'))
    expect(Buffer.from(await storage.getItemRaw(key(':photo:b%2.png')) as Uint8Array).toString()).toBe('replaced')
    await storage.removeItem(key(':pull:a_1.csv'))
    expect(await storage.hasItem(key(':pull:a_1.csv'))).toBe(false)
    expect(await storage.getItemRaw(key(':pull:a_1.csv'))).toBeNull()
    // A prefix with LIKE's own characters matches only itself.
    expect(await driver.getKeys(`t${tag}:photo:b%`, {})).toEqual([`t${tag}:photo:b%2.png`])
    expect(await driver.getKeys(`t${tag}_`, {})).toEqual([])
    await driver.clear!(`t${tag}:`, {})
    expect(await storage.getKeys(`uploads:t${tag}`)).toEqual([])
    expect(await storage.getKeys(`uploads:t${tag}x`)).toEqual([key('x:other.txt')])
    await driver.clear!(`t${tag}x:`, {})
    expect(await storage.hasItem(key('x:other.txt'))).toBe(false)
  })
})
