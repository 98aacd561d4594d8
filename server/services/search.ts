import { headlinePull } from '#shared/pulls/headline'
import { and, asc, eq, inArray, sql } from 'drizzle-orm'
import { displacementCi } from '#shared/engine/geometry'
import type { DerivedPullFigures } from '#shared/pulls/figures'
import { BUILD_STANDARD } from '#shared/pulls/summary'
import { createSearchIndex, type SearchDocument, type SearchIndex } from '../../search/index'
import { syntheticDocuments } from '../../search/synthetic'
import { shops, buildParts, builds, dynoPulls, type Build, type Shop, type DynoPull } from '../database/schema'
import type { Database } from '../database/types'
import type { ReadStoredText } from './curves'
import { asPublished } from './builds'
import { pullFiguresFor } from './pull-figures'

/** The one index of this server process: swapped whole by a rebuild, changed in place by syncBuild. */
let current: SearchIndex = createSearchIndex()
let ready: Promise<void> | null = null
/** Index writes run one at a time, so a sync never interleaves with a rebuild or a check. */
let queue: Promise<unknown> = Promise.resolve()

function exclusive<T>(work: () => Promise<T>): Promise<T> {
  const run = queue.then(work, work)
  queue = run.catch(() => undefined)
  return run
}

/** The index, once the first build from MariaDB has finished. */
export async function useSearchIndex(): Promise<SearchIndex> {
  if (ready) await ready
  return current
}

/** What the consistency check compares: changes when the build, its shop, its pulls or its parts list change. */
function stampQuery(db: Database) {
  return db.select({
    id: builds.id,
    build: builds.updatedAt,
    shop: shops.updatedAt,
    pulls: sql<string | null>`(select concat(count(*), '@', coalesce(max(${dynoPulls.updatedAt}), '')) from ${dynoPulls} where ${dynoPulls.buildId} = ${builds.id})`,
    parts: sql<number>`(select count(*) from ${buildParts} where ${buildParts.buildId} = ${builds.id})`,
  }).from(builds).innerJoin(shops, eq(shops.id, builds.shopId))
}

type StampRow = Awaited<ReturnType<typeof stampQuery>>[number]
const stampOf = (r: StampRow) => `${r.build.getTime()}|${r.shop.getTime()}|${r.pulls ?? ''}|${r.parts}`

/** Stamps of the published builds (all of them, or the given ids). */
async function publishedStamps(db: Database, ids?: number[]): Promise<Map<number, string>> {
  const published = eq(builds.status, 'published')
  const rows = await stampQuery(db).where(ids ? and(published, inArray(builds.id, ids)) : published)
  return new Map(rows.map(r => [r.id, stampOf(r)]))
}

type Figures = Pick<SearchDocument, 'peakHp' | 'peakHpRpm' | 'peakTq' | 'peakTqRpm' | 'curve'>

/** The headline pull's peaks and grid curve under the build standard, as stored with the pull; its summary alone when no figures are stored. */
function headlineFiguresOf(pull: DynoPull | undefined, stored: DerivedPullFigures | undefined): Figures {
  if (!pull) return { peakHp: null, peakHpRpm: null, peakTq: null, peakTqRpm: null, curve: null }
  if (!stored) return { peakHp: pull.summary.peakHp, peakHpRpm: pull.summary.peakHpRpm, peakTq: pull.summary.peakTq, peakTqRpm: pull.summary.peakTqRpm, curve: null }
  const under = stored.standards[BUILD_STANDARD]
  return {
    peakHp: under.peakHp,
    peakHpRpm: under.peakHpRpm,
    peakTq: Number.isFinite(under.peakTq) ? under.peakTq : null,
    peakTqRpm: Number.isFinite(under.peakTq) ? under.peakTqRpm : null,
    curve: stored.searchCurve,
  }
}

function documentOf(row: Build, shop: Shop, parts: string[], figures: Figures, stamp: string): SearchDocument {
  const build = asPublished(row)
  return {
    id: build.id,
    slug: build.slug,
    title: build.title,
    summary: build.summary,
    parts,
    heads: build.cylinderHeads,
    camshaft: `${build.camIntakeDurationDeg}°/${build.camExhaustDurationDeg}° at 0.050 in, ${build.camIntakeLiftIn.toFixed(3)}/${build.camExhaustLiftIn.toFixed(3)} in lift, ${build.camLobeSeparationDeg}° lobe separation`,
    intake: `${build.intakeManifold}, ${build.throttleBody}`,
    shop: { id: shop.id, slug: shop.slug, name: shop.shopName },
    family: build.engineFamily,
    displacementCi: displacementCi(build.boreIn, build.strokeIn, build.cylinders),
    ...figures,
    aspiration: build.aspiration,
    fuel: build.fuel,
    use: build.intendedUse,
    region: shop.region,
    priceCents: build.priceCents,
    verified: build.verifiedAt !== null,
    publishedAt: (build.publishedAt ?? build.createdAt).getTime(),
    stamp,
  }
}

/** Search documents of the published builds (all, or the given ids), read from MariaDB with each headline pull's stored figures. */
export async function loadSearchDocuments(db: Database, read: ReadStoredText, ids?: number[]): Promise<SearchDocument[]> {
  if (ids && ids.length === 0) return []
  const published = eq(builds.status, 'published')
  const where = ids ? and(published, inArray(builds.id, ids)) : published
  const [rows, partRows, pullRows, stamps] = await Promise.all([
    db.select({ build: builds, shop: shops }).from(builds).innerJoin(shops, eq(shops.id, builds.shopId)).where(where),
    db.select({ buildId: buildParts.buildId, category: buildParts.category, part: buildParts.part, partNumber: buildParts.partNumber })
      .from(buildParts).innerJoin(builds, eq(builds.id, buildParts.buildId)).where(where).orderBy(asc(buildParts.buildId), asc(buildParts.position)),
    db.select({ pull: dynoPulls }).from(dynoPulls).innerJoin(builds, eq(builds.id, dynoPulls.buildId)).where(where),
    publishedStamps(db, ids),
  ])
  const partsOf = new Map<number, string[]>()
  for (const p of partRows) {
    const list = partsOf.get(p.buildId) ?? []
    list.push(`${p.category}: ${p.part} ${p.partNumber}`.trim())
    partsOf.set(p.buildId, list)
  }
  const pullsOf = new Map<number, DynoPull[]>()
  for (const { pull } of pullRows) {
    const list = pullsOf.get(pull.buildId) ?? []
    list.push(pull)
    pullsOf.set(pull.buildId, list)
  }
  // The one headline rule (shared/pulls/headline.ts): a pull failing its own checks never sets a filterable figure.
  const headlines = new Map(rows.map(({ build }) => [build.id, headlinePull(pullsOf.get(build.id) ?? [])?.pull]))
  // The headline pulls' stored figures: no pull file is parsed here (only one stored before the table was is derived once).
  const stored = await pullFiguresFor(db, read, [...headlines.values()].flatMap(p => (p ? [p.id] : [])))
  const docs: SearchDocument[] = []
  for (const { build, shop } of rows) {
    const pull = headlines.get(build.id)
    docs.push(documentOf(build, shop, partsOf.get(build.id) ?? [], headlineFiguresOf(pull, pull ? stored.get(pull.id) : undefined), stamps.get(build.id) ?? ''))
  }
  return docs
}

/** One build's search document, or null when the build is not published (drafts, archived, deleted). */
export async function buildSearchDocument(db: Database, read: ReadStoredText, buildId: number): Promise<SearchDocument | null> {
  const [doc] = await loadSearchDocuments(db, read, [buildId])
  return doc ?? null
}

/** Builds a fresh index from MariaDB and swaps it in; queries keep using the old one until it is ready. */
export function rebuildIndex(db: Database, read: ReadStoredText): Promise<{ documents: number, ms: number }> {
  const work = exclusive(async () => {
    const t0 = performance.now()
    const docs = await loadSearchDocuments(db, read)
    const fresh = createSearchIndex()
    fresh.build(docs)
    current = fresh
    return { documents: docs.length, ms: Math.round(performance.now() - t0) }
  })
  if (!ready) ready = work.then(() => undefined, () => undefined)
  return work
}

/** Brings one build's entry in step with MariaDB: call after any write that changes a build, its shop or its pulls. */
export function syncBuild(db: Database, read: ReadStoredText, buildId: number): Promise<'indexed' | 'removed' | 'absent'> {
  return exclusive(async () => {
    const doc = await buildSearchDocument(db, read, buildId)
    if (doc) {
      current.upsert(doc)
      return 'indexed'
    }
    return current.remove(buildId) ? 'removed' : 'absent'
  })
}

export interface IndexCheck {
  checked: number
  added: number
  updated: number
  removed: number
}

/** Compares the index with MariaDB (ids and stamps) and repairs whatever drifted. */
export function checkIndex(db: Database, read: ReadStoredText): Promise<IndexCheck> {
  return exclusive(async () => {
    const [truth, held] = [await publishedStamps(db), current.stamps()]
    const missing: number[] = []
    const stale: number[] = []
    for (const [id, stamp] of truth) {
      const have = held.get(id)
      if (have === undefined) missing.push(id)
      else if (have !== stamp) stale.push(id)
    }
    let removed = 0
    for (const id of held.keys()) if (!truth.has(id) && current.remove(id)) removed++
    const ids = [...missing, ...stale]
    for (let i = 0; i < ids.length; i += 500) {
      for (const doc of await loadSearchDocuments(db, read, ids.slice(i, i + 500))) current.upsert(doc)
    }
    return { checked: truth.size, added: missing.length, updated: stale.length, removed }
  })
}

/** Bench only (TW_BENCH=1): fills the index with invented builds instead of MariaDB's, see README "Search". */
export function loadSyntheticIndex(count: number): Promise<{ documents: number, ms: number }> {
  const work = exclusive(async () => {
    const t0 = performance.now()
    const fresh = createSearchIndex()
    fresh.build(syntheticDocuments(count))
    current = fresh
    return { documents: fresh.size, ms: Math.round(performance.now() - t0) }
  })
  ready = work.then(() => undefined, () => undefined)
  return work
}
