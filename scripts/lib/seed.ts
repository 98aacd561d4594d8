import { createHash } from 'node:crypto'
import { hash } from '@node-rs/argon2'
import { eq } from 'drizzle-orm'
import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { createStorage } from 'unstorage'
import fsDriver from 'unstorage/drivers/fs'
import { mariadbStorage } from '../../server/utils/mariadb-storage'
import { headlinePull } from '../../shared/pulls/headline'
import { buildPublishSchema } from '../../shared/schemas/build'
import { evaluatePull } from '../../shared/pulls/evaluate'
import type { EvidenceCheck } from '../../shared/engine/types'
import type { PullSummaryFigures } from '../../shared/pulls/summary'
import type { DerivedPullFigures } from '../../shared/pulls/figures'
import * as schema from '../../server/database/schema'
import { createStripeClient } from '../../server/utils/stripe'
import { canonicalFilters } from '../../shared/search/saved'
import type { SearchFilterParams } from '../../shared/schemas/search'
import { seedDemoDeals, seedDemoDispute } from './seed-deals'
import { demoSwapBuilds } from './seed-swaps'
import { seedDemoReviews } from './seed-reviews'
import { DEMO_ADMIN, DEMO_PASSWORD, DEMO_RACERS, DEMO_SHOPS, demoBuilds, pullCsv, type DemoPull } from './demo-data'

const { shops, buildParts, builds, dynoPulls, files, pullFigures, users } = schema
type Db = MySql2Database<typeof schema>

async function ensureUser(db: Db, u: { name: string, email: string, role: 'racer' | 'builder' | 'admin' }, passwordHash: string): Promise<number> {
  const [existing] = await db.select({ id: users.id }).from(users).where(eq(users.email, u.email))
  if (existing) return existing.id
  const [row] = await db.insert(users).values({ ...u, passwordHash, emailVerifiedAt: new Date() }).$returningId()
  return row!.id
}

/**
 * Seeds the invented demo scenario; entities that already exist (by e-mail or slug) are left as they are, so it is safe to run twice.
 * Given the local payments fake, it also seeds an open dispute paid through it; with `savedSearches`, two racers'
 * saved searches (the tests seed without either, so their own searches and mail stay theirs alone).
 */
export async function seedDemo(opts: { url: string, uploadsDir: string, uploadsDriver?: 'fs' | 'mariadb', paymentsFake?: { port: number, secretKey: string }, savedSearches?: boolean }): Promise<{ builds: number, created: number }> {
  const connection = await mysql.createConnection({ uri: opts.url, timezone: 'Z' })
  const db = drizzle(connection, { schema, mode: 'default' })
  // The same storage the app mounts (server/plugins/storage.ts): a folder, or MariaDB's stored_files rows.
  const storage = createStorage({ driver: opts.uploadsDriver === 'mariadb' ? mariadbStorage({ db: () => db }) : fsDriver({ base: opts.uploadsDir }) })
  let created = 0
  try {
    const passwordHash = await hash(DEMO_PASSWORD)
    await ensureUser(db, { ...DEMO_ADMIN, role: 'admin' }, passwordHash)
    for (const racer of DEMO_RACERS) await ensureUser(db, { ...racer, role: 'racer' }, passwordHash)

    const shopIds = new Map<string, { profileId: number, userId: number }>()
    for (const shop of DEMO_SHOPS) {
      const userId = await ensureUser(db, { ...shop.owner, role: 'builder' }, passwordHash)
      const [existing] = await db.select({ id: shops.id }).from(shops).where(eq(shops.slug, shop.slug))
      let profileId = existing?.id
      if (!profileId) {
        const [row] = await db.insert(shops).values({
          userId, shopName: shop.shopName, slug: shop.slug, region: shop.region, bio: shop.bio, specialties: shop.specialties, capabilities: shop.capabilities,
        }).$returningId()
        profileId = row!.id
      }
      shopIds.set(shop.slug, { profileId, userId })
    }

    const scenario = demoBuilds()
    // The before/after comparisons of the swap results page (scripts/lib/seed-swaps.ts) follow the scenario's builds.
    const all = [...scenario, ...demoSwapBuilds(scenario)]
    // Pulls still awaiting a check arrived over the last few days, so the admin's queue has an order and an age to show.
    const submittedHoursAgo = [70, 26, 9, 3]
    let submittedBuilds = 0
    const fingerprints = (await db.select({ buildId: dynoPulls.buildId, fingerprint: dynoPulls.fingerprint }).from(dynoPulls))
      .filter((f): f is { buildId: number, fingerprint: string } => f.fingerprint !== null)
    for (const b of all) {
      const shop = shopIds.get(b.shopSlug)!
      const [existing] = await db.select({ id: builds.id }).from(builds).where(eq(builds.slug, b.slug))
      if (existing) continue
      // The seeded pulls take the same path as an upload: a stored CSV file, evaluated by the engine module.
      const pullRows: { pull: DemoPull, sha256: string, storageKey: string, summary: PullSummaryFigures, fingerprint: string, checks: EvidenceCheck[], figures: DerivedPullFigures, size: number }[] = []
      for (const pull of b.pulls) {
        const text = pullCsv(pull.points)
        const declaredPeakHp = Math.max(...pull.points.map(p => p.hp))
        const declaredPeakTq = Math.max(...pull.points.map(p => p.lbFt))
        const evaluation = evaluatePull({
          text,
          declared: { standard: pull.declaredStandard, peakHp: declaredPeakHp, peakTq: declaredPeakTq },
          weather: pull.weather,
          build: { id: null, aspiration: b.aspiration, boreIn: b.boreIn, strokeIn: b.strokeIn, cylinders: b.cylinders },
          fingerprintsOfOtherBuilds: fingerprints,
        })
        if (!evaluation.ok) throw new Error(`demo pull for ${b.slug} does not parse: ${evaluation.errors[0]?.message}`)
        const sha256 = createHash('sha256').update(text).digest('hex')
        const storageKey = `pulls/${sha256}.csv`
        await storage.setItem(storageKey, text)
        pullRows.push({ pull, sha256, storageKey, summary: evaluation.summary, fingerprint: evaluation.fingerprint, checks: evaluation.checks, figures: evaluation.figures, size: Buffer.byteLength(text) })
      }
      // The one headline rule, as the app applies it after every pull change (shared/pulls/headline.ts).
      const chosen = headlinePull(pullRows.map((r, i) => ({ id: i + 1, status: r.pull.status, summary: r.summary, checks: r.checks, row: r })))
      const headline = chosen?.pull.row ?? null
      const verified = b.pulls.every(p => p.status === 'verified')
      const publishedAt = new Date(Date.now() - b.publishedDaysAgo * 86_400_000)
      const submittedAt = b.pulls.some(p => p.status === 'submitted')
        ? new Date(Date.now() - submittedHoursAgo[submittedBuilds++ % submittedHoursAgo.length]! * 3_600_000)
        : undefined
      await db.transaction(async (tx) => {
        // The combination's columns are what the publish schema holds, checked as a publish checks them.
        const columns = buildPublishSchema.parse(b)
        const [row] = await tx.insert(builds).values({
          ...columns,
          slug: b.slug,
          shopId: shop.profileId,
          status: 'published',
          publishedAt,
          peakHp: headline?.summary.peakHp ?? null,
          peakHpRpm: headline?.summary.peakHpRpm ?? null,
          peakTq: headline?.summary.peakTq ?? null,
          peakTqRpm: headline?.summary.peakTqRpm ?? null,
          verifiedAt: verified ? publishedAt : null,
        }).$returningId()
        const buildId = row!.id
        for (const r of pullRows) fingerprints.push({ buildId, fingerprint: r.fingerprint })
        await tx.insert(buildParts).values(b.parts.map((p, position) => ({ ...p, buildId, position })))
        for (const r of pullRows) {
          const [file] = await tx.insert(files).values({
            ownerId: shop.userId, kind: 'pull', mime: 'text/csv', sizeBytes: r.size, sha256: r.sha256, storageKey: r.storageKey, originalName: `${b.slug}.csv`,
          }).$returningId()
          const [pullRow] = await tx.insert(dynoPulls).values({
            buildId,
            label: r.pull.label,
            fileId: file!.id,
            dynoKind: r.pull.dynoKind,
            declaredStandard: r.pull.declaredStandard,
            baroInHg: r.pull.weather.baroInHg,
            airTempF: r.pull.weather.airTempF,
            humidityPct: r.pull.weather.humidityPct,
            declaredPeakHp: Math.max(...r.pull.points.map(p => p.hp)),
            declaredPeakTq: Math.max(...r.pull.points.map(p => p.lbFt)),
            summary: r.summary,
            fingerprint: r.fingerprint,
            checks: r.checks,
            status: r.pull.status,
            comparisonRole: r.pull.comparisonRole ?? null,
            changeKind: r.pull.changeKind ?? null,
            changeNote: r.pull.changeNote ?? null,
            createdAt: r.pull.status === 'submitted' ? submittedAt : undefined,
          }).$returningId()
          // The derived figures, stored with the pull as an upload stores them (server/services/pull-figures.ts).
          await tx.insert(pullFigures).values({ pullId: pullRow!.id, version: r.figures.version, standards: r.figures.standards, curve: r.figures.curve, searchCurve: r.figures.searchCurve })
        }
      })
      created++
    }
    await seedDemoDeals(db)
    if (opts.savedSearches) await seedDemoSavedSearches(db)
    if (opts.paymentsFake) {
      const stripe = createStripeClient({ secretKey: opts.paymentsFake.secretKey, apiHost: '127.0.0.1', apiPort: opts.paymentsFake.port, apiProtocol: 'http' })
      // A demo whose payments fake lost its books (or another data folder) still starts: the dispute is a nicety.
      await seedDemoDispute(db, storage, stripe).catch((e: unknown) => console.warn(`› the demo dispute was not seeded: ${e instanceof Error ? e.message : String(e)}`))
    }
    // Last, so the ids of the deals above stay the same with or without the dispute.
    await seedDemoReviews(db)
    return { builds: all.length, created }
  }
  finally {
    await connection.end()
  }
}

/**
 * Two racers' saved searches. The first matches the twin-turbo pump-gas build whose pulls wait in the
 * admin's queue, so verifying one of them in the demo sends its saver an e-mail (see the mail inbox).
 */
const DEMO_SAVED_SEARCHES: { email: string, name: string, query: SearchFilterParams }[] = [
  { email: 'jonah@racer.test', name: 'Turbo on pump gas, 450–520 ci', query: { ciMin: 450, ciMax: 520, aspiration: ['turbo'], fuel: ['pump_gas'] } },
  { email: 'alma@racer.test', name: 'About 900 hp on E85', query: { hpTarget: 900, hpTolerance: 90, fuel: ['e85'], verified: true } },
]

async function seedDemoSavedSearches(db: Db): Promise<void> {
  for (const s of DEMO_SAVED_SEARCHES) {
    const [user] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, s.email))
    if (!user) continue
    const [existing] = await db.select({ id: schema.savedSearches.id }).from(schema.savedSearches).where(eq(schema.savedSearches.userId, user.id)).limit(1)
    if (existing) continue
    await db.insert(schema.savedSearches).values({ userId: user.id, name: s.name, query: canonicalFilters(s.query), createdAt: new Date() })
  }
}
