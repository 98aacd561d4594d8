import { randomUUID } from 'node:crypto'
import { copyFileSync, mkdirSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { eq } from 'drizzle-orm'
import type { MySql2Database } from 'drizzle-orm/mysql2'
import * as schema from '../../server/database/schema'
import { loadConfig } from '../../scripts/lib/config'

type Db = MySql2Database<typeof schema>

/** A fresh submitted pull on an existing seeded build, so a test can decide it without touching the seed's. */
export async function makeSubmittedPull(db: Db, buildSlug?: string) {
  const [build] = buildSlug
    ? await db.select().from(schema.builds).where(eq(schema.builds.slug, buildSlug))
    : await db.select().from(schema.builds).where(eq(schema.builds.status, 'published')).limit(1)
  const [source] = await db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, build!.id)).limit(1)
  const [file] = await db.select().from(schema.files).where(eq(schema.files.id, source!.fileId))
  // A real stored copy of the file, so every page that reads the build's pulls still works.
  const storageKey = `tests/${randomUUID()}.csv`
  const uploads = resolve(loadConfig().dataDir, 'test-uploads')
  mkdirSync(dirname(resolve(uploads, storageKey)), { recursive: true })
  copyFileSync(resolve(uploads, file!.storageKey), resolve(uploads, storageKey))
  const [copy] = await db.insert(schema.files).values({ ...file!, id: undefined, storageKey }).$returningId()
  const { id: _id, createdAt: _c, updatedAt: _u, ...rest } = source!
  const [pull] = await db.insert(schema.dynoPulls).values({ ...rest, fileId: copy!.id, status: 'submitted', label: `Test pull ${randomUUID().slice(0, 6)}`, comparisonRole: null, changeKind: null, changeNote: null }).$returningId()
  return { buildId: build!.id, pullId: pull!.id, build: build! }
}

/** Any user of a role, from the seed. */
export async function seededUser(db: Db, role: 'racer' | 'builder' | 'admin') {
  const [user] = await db.select().from(schema.users).where(eq(schema.users.role, role)).limit(1)
  return user!
}
