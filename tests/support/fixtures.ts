import { randomBytes, randomUUID } from 'node:crypto'
import { resolve } from 'node:path'
import { and, asc, eq, isNull } from 'drizzle-orm'
import type { MySql2Database } from 'drizzle-orm/mysql2'
import { createStorage } from 'unstorage'
import fsDriver from 'unstorage/drivers/fs'
import * as schema from '../../server/database/schema'
import { loadConfig } from '../../scripts/lib/config'

type Db = MySql2Database<typeof schema>

/** The uploads folder the test app reads (tests/support/global-setup.ts fills it with the seed's files). */
export const testUploads = () => createStorage({ driver: fsDriver({ base: resolve(loadConfig().dataDir, 'test-uploads') }) })

/** Reads a stored file's text from the test app's uploads, as the server's readUploadText does. */
export async function readTestUpload(storageKey: string): Promise<string | null> {
  const value = await testUploads().getItemRaw(storageKey)
  if (value === null || value === undefined) return null
  return typeof value === 'string' ? value : Buffer.from(value as Uint8Array).toString('utf8')
}

/** A copy of a stored file (row and content) under a new storage key, as a fresh upload would make. */
async function copyFile(db: Db, fileId: number, ownerId?: number): Promise<number> {
  const [file] = await db.select().from(schema.files).where(eq(schema.files.id, fileId))
  const storageKey = `tests/${randomUUID()}.csv`
  const storage = testUploads()
  await storage.setItemRaw(storageKey, await storage.getItemRaw(file!.storageKey))
  const [copy] = await db.insert(schema.files).values({ ...file!, id: undefined, ownerId: ownerId ?? file!.ownerId, storageKey, createdAt: undefined }).$returningId()
  return copy!.id
}

/** A fresh submitted pull on an existing seeded build, so a test can decide it without touching the seed's. */
export async function makeSubmittedPull(db: Db, buildSlug?: string) {
  const [build] = buildSlug
    ? await db.select().from(schema.builds).where(eq(schema.builds.slug, buildSlug))
    : await db.select().from(schema.builds).where(eq(schema.builds.status, 'published')).limit(1)
  const [source] = await db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, build!.id)).orderBy(asc(schema.dynoPulls.id)).limit(1)
  const fileId = await copyFile(db, source!.fileId)
  const { id: _id, createdAt: _c, updatedAt: _u, ...rest } = source!
  const [pull] = await db.insert(schema.dynoPulls).values({
    ...rest, fileId, status: 'submitted', reviewNote: null, reviewedAt: null, label: `Test pull ${randomUUID().slice(0, 6)}`, comparisonRole: null, changeKind: null, changeNote: null,
  }).$returningId()
  return { buildId: build!.id, pullId: pull!.id, build: build! }
}

/**
 * A new published build without the verified mark, with one submitted pull (a copy of a seeded
 * verified build's first pull, its fingerprint left out so it matches no other build), owned by
 * `shopId` or by the seeded build's shop.
 */
export async function makeBuildAwaitingCheck(db: Db, opts: { shopId?: number, title?: string } = {}) {
  const [source] = await db.select().from(schema.builds)
    .where(and(eq(schema.builds.status, 'published'), eq(schema.builds.slug, 'harrow-362-na-race-gas-1')))
  const [sourcePull] = await db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, source!.id)).orderBy(asc(schema.dynoPulls.id)).limit(1)
  const tag = randomBytes(3).toString('hex')
  const shopId = opts.shopId ?? source!.shopId
  const [shop] = await db.select().from(schema.shops).where(eq(schema.shops.id, shopId))
  const { id: _id, createdAt: _c, updatedAt: _u, ...columns } = source!
  const title = opts.title ?? `Awaiting verification ${tag}`
  const slug = `awaiting-check-${tag}`
  // Published long ago, so the test builds never lead the newest-first lists that other tests open.
  const [build] = await db.insert(schema.builds).values({ ...columns, shopId: shopId, slug, title, publishedAt: new Date(Date.now() - 3 * 365 * 86_400_000), verifiedAt: null }).$returningId()
  // A complete build, parts list included, like every published one.
  const parts = await db.select().from(schema.buildParts).where(eq(schema.buildParts.buildId, source!.id))
  if (parts.length) await db.insert(schema.buildParts).values(parts.map(({ id: _partId, ...p }) => ({ ...p, buildId: build!.id })))
  const fileId = await copyFile(db, sourcePull!.fileId, shop!.userId)
  const { id: _pid, createdAt: _pc, updatedAt: _pu, ...pullColumns } = sourcePull!
  const [pull] = await db.insert(schema.dynoPulls).values({
    ...pullColumns, buildId: build!.id, fileId, fingerprint: null, status: 'submitted', reviewNote: null, reviewedAt: null,
    label: `Final pull ${tag}`, comparisonRole: null, changeKind: null, changeNote: null,
  }).$returningId()
  return { buildId: build!.id, slug, title, pullId: pull!.id, pullLabel: `Final pull ${tag}`, summary: sourcePull!.summary }
}

/** Any user of a role, from the seed. */
export async function seededUser(db: Db, role: 'racer' | 'builder' | 'admin') {
  const [user] = await db.select().from(schema.users).where(and(eq(schema.users.role, role), isNull(schema.users.suspendedAt))).orderBy(asc(schema.users.id)).limit(1)
  return user!
}

/** The shop of a shop account. */
export async function shopOf(db: Db, userId: number) {
  const [shop] = await db.select().from(schema.shops).where(eq(schema.shops.userId, userId))
  return shop!
}
