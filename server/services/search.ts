import { headlinePull } from '#shared/pulls/headline'
import { and, asc, eq, inArray, sql } from 'drizzle-orm'
import { convertCurve, isCorrectionStandard } from '#shared/engine/correction'
import { peaks, resample } from '#shared/engine/curves'
import { displacementCi } from '#shared/engine/geometry'
import { parsePull } from '#shared/engine/parse'
import { LISTING_STANDARD } from '#shared/pulls/summary'
import { createSearchIndex, CURVE_STEP_RPM, type SearchDocument, type SearchIndex } from '../../search/index'
import { syntheticDocuments } from '../../search/synthetic'
import { builderProfiles, buildParts, builds, dynoPulls, files, type Build, type BuilderProfile, type DynoPull } from '../database/schema'
import type { Database } from '../database/types'
import { readUploadText } from '../utils/storage'
import type { ReadStoredText } from './curves'
import { asPublished } from './listings'

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
    shop: builderProfiles.updatedAt,
    pulls: sql<string | null>`(select concat(count(*), '@', coalesce(max(${dynoPulls.updatedAt}), '')) from ${dynoPulls} where ${dynoPulls.buildId} = ${builds.id})`,
    parts: sql<number>`(select count(*) from ${buildParts} where ${buildParts.buildId} = ${builds.id})`,
  }).from(builds).innerJoin(builderProfiles, eq(builderProfiles.id, builds.builderId))
}

type StampRow = Awaited<ReturnType<typeof stampQuery>>[number]
const stampOf = (r: StampRow) => `${r.build.getTime()}|${r.shop.getTime()}|${r.pulls ?? ''}|${r.parts}`

/** Stamps of the published builds (all of them, or the given ids). */
async function publishedStamps(db: Database, ids?: number[]): Promise<Map<number, string>> {
  const published = eq(builds.status, 'published')
  const rows = await stampQuery(db).where(ids ? and(published, inArray(builds.id, ids)) : published)
  return new Map(rows.map(r => [r.id, stampOf(r)]))
}

type PullWithFile = DynoPull & { storageKey: string }

/** Peaks and the grid curve under SAE J1349 (2004), recomputed from the raw pull file; the stored summary when the file is unreadable. */
async function figuresOf(read: ReadStoredText, pull: PullWithFile | undefined) {
  if (!pull) return { peakHp: null, peakHpRpm: null, peakTq: null, peakTqRpm: null, curve: null }
  const fallback = { peakHp: pull.summary.peakHp, peakHpRpm: pull.summary.peakHpRpm, peakTq: pull.summary.peakTq, peakTqRpm: pull.summary.peakTqRpm, curve: null }
  const text = await read(pull.storageKey)
  if (text === null) {
    console.warn(`search: pull file ${pull.storageKey} of build ${pull.buildId} is missing; indexing its stored figures without a curve`)
    return fallback
  }
  const parsed = parsePull(text)
  if (!parsed.ok) return fallback
  const weather = pull.baroInHg !== null && pull.airTempF !== null && pull.humidityPct !== null
    ? { baroInHg: pull.baroInHg, airTempF: pull.airTempF, humidityPct: pull.humidityPct }
    : null
  const declared = isCorrectionStandard(pull.declaredStandard) ? pull.declaredStandard : 'UNCORRECTED'
  const recomputed = (() => {
    try {
      const points = convertCurve(parsed.points, { standard: declared, weather }, { standard: LISTING_STANDARD, weather }).points
      return { pk: peaks(points), grid: resample(points, CURVE_STEP_RPM) }
    }
    catch (err) {
      // A stored file the engine module refuses (it was checked on upload) must not stop the whole index.
      console.warn(`search: pull ${pull.id} of build ${pull.buildId} could not be recomputed (${(err as Error).message}); indexing its stored figures`)
      return null
    }
  })()
  if (!recomputed) return fallback
  const { pk, grid } = recomputed
  const one = (n: number) => Math.round(n * 10) / 10
  return {
    peakHp: one(pk.peakHp),
    peakHpRpm: pk.peakHpRpm,
    peakTq: Number.isFinite(pk.peakTq) ? one(pk.peakTq) : null,
    peakTqRpm: Number.isFinite(pk.peakTq) ? pk.peakTqRpm : null,
    curve: grid.length > 0 ? { startRpm: (grid[0] as { rpm: number }).rpm, hp: grid.map(p => Math.round(p.hp * 10) / 10) } : null,
  }
}

function documentOf(row: Build, shop: BuilderProfile, parts: string[], figures: Awaited<ReturnType<typeof figuresOf>>, stamp: string): SearchDocument {
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
    builder: { id: shop.id, slug: shop.slug, name: shop.shopName },
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

/** Search documents of the published builds (all, or the given ids), read from MariaDB and the pull files. */
export async function loadSearchDocuments(db: Database, ids?: number[], read: ReadStoredText = readUploadText): Promise<SearchDocument[]> {
  if (ids && ids.length === 0) return []
  const published = eq(builds.status, 'published')
  const where = ids ? and(published, inArray(builds.id, ids)) : published
  const [rows, partRows, pullRows, stamps] = await Promise.all([
    db.select({ build: builds, shop: builderProfiles }).from(builds).innerJoin(builderProfiles, eq(builderProfiles.id, builds.builderId)).where(where),
    db.select({ buildId: buildParts.buildId, category: buildParts.category, part: buildParts.part, partNumber: buildParts.partNumber })
      .from(buildParts).innerJoin(builds, eq(builds.id, buildParts.buildId)).where(where).orderBy(asc(buildParts.buildId), asc(buildParts.position)),
    db.select({ pull: dynoPulls, storageKey: files.storageKey }).from(dynoPulls)
      .innerJoin(builds, eq(builds.id, dynoPulls.buildId)).innerJoin(files, eq(files.id, dynoPulls.fileId)).where(where),
    publishedStamps(db, ids),
  ])
  const partsOf = new Map<number, string[]>()
  for (const p of partRows) {
    const list = partsOf.get(p.buildId) ?? []
    list.push(`${p.category}: ${p.part} ${p.partNumber}`.trim())
    partsOf.set(p.buildId, list)
  }
  const pullsOf = new Map<number, PullWithFile[]>()
  for (const { pull, storageKey } of pullRows) {
    const list = pullsOf.get(pull.buildId) ?? []
    list.push({ ...pull, storageKey })
    pullsOf.set(pull.buildId, list)
  }
  const docs: SearchDocument[] = []
  for (const { build, shop } of rows) {
    // The one headline rule (shared/pulls/headline.ts): a pull failing its own checks never sets a filterable figure.
    const figures = await figuresOf(read, headlinePull(pullsOf.get(build.id) ?? [])?.pull)
    docs.push(documentOf(build, shop, partsOf.get(build.id) ?? [], figures, stamps.get(build.id) ?? ''))
  }
  return docs
}

/** One build's search document, or null when the build is not published (drafts, archived, deleted). */
export async function buildSearchDocument(db: Database, buildId: number, read: ReadStoredText = readUploadText): Promise<SearchDocument | null> {
  const [doc] = await loadSearchDocuments(db, [buildId], read)
  return doc ?? null
}

/** Builds a fresh index from MariaDB and swaps it in; queries keep using the old one until it is ready. */
export function rebuildIndex(db: Database): Promise<{ documents: number, ms: number }> {
  const work = exclusive(async () => {
    const t0 = performance.now()
    const docs = await loadSearchDocuments(db)
    const fresh = createSearchIndex()
    fresh.build(docs)
    current = fresh
    return { documents: docs.length, ms: Math.round(performance.now() - t0) }
  })
  if (!ready) ready = work.then(() => undefined, () => undefined)
  return work
}

/** Brings one build's entry in step with MariaDB: call after any write that changes a build, its shop or its pulls. */
export function syncBuild(db: Database, buildId: number): Promise<'indexed' | 'removed' | 'absent'> {
  return exclusive(async () => {
    const doc = await buildSearchDocument(db, buildId)
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
export function checkIndex(db: Database): Promise<IndexCheck> {
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
      for (const doc of await loadSearchDocuments(db, ids.slice(i, i + 500))) current.upsert(doc)
    }
    return { checked: truth.size, added: missing.length, updated: stale.length, removed }
  })
}

/** Bench only (TW_BENCH=1): fills the index with invented listings instead of MariaDB's, see README "Search". */
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
