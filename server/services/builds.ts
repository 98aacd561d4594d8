import { createError } from 'h3'
import { and, asc, count, desc, eq, inArray } from 'drizzle-orm'
import { displacementCi } from '#shared/engine/geometry'
import type { BuildDetail, ShopFigures, ShopDetail, BuildSummary, Page, PullSummaryRow } from '#shared/types/builds'
import type { Pagination } from '#shared/schemas/common'
import { REQUIRED_FOR_PUBLISH, type CombinationField } from '#shared/schemas/build'
import { shops, buildParts, buildPhotos, builds, dynoPulls, type Build, type Shop } from '../database/schema'
import type { Database } from '../database/types'

const summaryColumns = { build: builds, shop: shops }

/** A build whose combination is complete, as every published row is (builds_published_complete holds it in the table). */
export type PublishedBuild = Build & { [K in CombinationField]: NonNullable<Build[K]> }

/** Narrows a published row to its complete type; a row that breaks the rule is a server fault, not bad input. */
export function asPublished(build: Build): PublishedBuild {
  const missing = REQUIRED_FOR_PUBLISH.filter(k => build[k] === null)
  if (missing.length) throw createError({ status: 500, message: `Build ${build.id} is listed but lacks ${missing.join(', ')}.` })
  return build as PublishedBuild
}

function toSummary(row: Build, shop: Shop): BuildSummary {
  const build = asPublished(row)
  return {
    slug: build.slug,
    title: build.title,
    engineFamily: build.engineFamily,
    cylinders: build.cylinders,
    displacementCi: displacementCi(build.boreIn, build.strokeIn, build.cylinders),
    aspiration: build.aspiration,
    fuel: build.fuel,
    intendedUse: build.intendedUse,
    priceCents: build.priceCents,
    peakHp: build.peakHp,
    peakHpRpm: build.peakHpRpm,
    peakTq: build.peakTq,
    peakTqRpm: build.peakTqRpm,
    verified: build.verifiedAt !== null,
    shop: { slug: shop.slug, shopName: shop.shopName, region: shop.region },
  }
}

/** Published builds, newest first, with their shop. */
export async function listPublishedBuilds(db: Database, { page, perPage }: Pagination): Promise<Page<BuildSummary>> {
  const published = eq(builds.status, 'published')
  const [rows, totals] = await Promise.all([
    db.select(summaryColumns).from(builds)
      .innerJoin(shops, eq(shops.id, builds.shopId))
      .where(published)
      .orderBy(desc(builds.publishedAt), asc(builds.id))
      .limit(perPage).offset((page - 1) * perPage),
    db.select({ n: count() }).from(builds).where(published),
  ])
  return { total: totals[0]?.n ?? 0, page, perPage, items: rows.map(r => toSummary(r.build, r.shop)) }
}

/** One published build with its parts list and pull summaries, or null when there is none to show. */
export async function getPublishedBuild(db: Database, slug: string): Promise<BuildDetail | null> {
  const [row] = await db.select(summaryColumns).from(builds)
    .innerJoin(shops, eq(shops.id, builds.shopId))
    .where(and(eq(builds.slug, slug), eq(builds.status, 'published')))
    .limit(1)
  if (!row) return null
  const build = asPublished(row.build)
  const [parts, pulls, photos] = await Promise.all([
    db.select().from(buildParts).where(eq(buildParts.buildId, build.id)).orderBy(asc(buildParts.position)),
    db.select().from(dynoPulls).where(eq(dynoPulls.buildId, build.id)).orderBy(asc(dynoPulls.id)),
    db.select().from(buildPhotos).where(eq(buildPhotos.buildId, build.id)).orderBy(asc(buildPhotos.position), asc(buildPhotos.id)),
  ])
  return {
    ...toSummary(build, row.shop),
    summary: build.summary,
    boreIn: build.boreIn,
    strokeIn: build.strokeIn,
    rodLengthIn: build.rodLengthIn,
    cylinderHeads: build.cylinderHeads,
    chamberCc: build.chamberCc,
    pistonCc: build.pistonCc,
    gasketBoreIn: build.gasketBoreIn,
    gasketThicknessIn: build.gasketThicknessIn,
    deckClearanceIn: build.deckClearanceIn,
    camIntakeDurationDeg: build.camIntakeDurationDeg,
    camExhaustDurationDeg: build.camExhaustDurationDeg,
    camIntakeLiftIn: build.camIntakeLiftIn,
    camExhaustLiftIn: build.camExhaustLiftIn,
    camLobeSeparationDeg: build.camLobeSeparationDeg,
    camIntakeCenterlineDeg: build.camIntakeCenterlineDeg,
    intakeManifold: build.intakeManifold,
    throttleBody: build.throttleBody,
    injectorSizeLbHr: build.injectorSizeLbHr,
    injectorCount: build.injectorCount,
    engineManagement: build.engineManagement,
    publishedAt: build.publishedAt?.toISOString() ?? null,
    photos: photos.map(p => ({ id: p.id, caption: p.caption, url: `/api/builds/${build.slug}/photos/${p.id}` })),
    parts: parts.map(p => ({
      position: p.position, category: p.category, part: p.part, partNumber: p.partNumber, quantity: p.quantity, unitPriceCents: p.unitPriceCents,
    })),
    pulls: pulls.map((p): PullSummaryRow => ({
      id: p.id,
      label: p.label,
      dynoKind: p.dynoKind,
      declaredStandard: p.declaredStandard,
      status: p.status,
      peakHp: p.summary.peakHp,
      peakHpRpm: p.summary.peakHpRpm,
      peakTq: p.summary.peakTq,
      peakTqRpm: p.summary.peakTqRpm,
    })),
  }
}

/** A shop's public profile with its published builds. */
export async function getShop(db: Database, slug: string): Promise<ShopDetail | null> {
  const [shop] = await db.select().from(shops).where(eq(shops.slug, slug)).limit(1)
  if (!shop) return null
  const rows = await db.select().from(builds)
    .where(and(eq(builds.shopId, shop.id), inArray(builds.status, ['published'])))
    .orderBy(desc(builds.publishedAt))
  const summaries = rows.map(b => toSummary(b, shop))
  return {
    slug: shop.slug,
    shopName: shop.shopName,
    region: shop.region,
    bio: shop.bio,
    specialties: shop.specialties,
    capabilities: shop.capabilities,
    builds: summaries,
    figures: shopFigures(summaries),
  }
}

/** A shop's proven-results figures, over its verified builds only. */
export function shopFigures(summaries: BuildSummary[]): ShopFigures {
  const verified = summaries.filter(b => b.verified && b.peakHp !== null)
  const hp = verified.map(b => b.peakHp as number)
  const perCi = verified.map(b => (b.peakHp as number) / b.displacementCi).sort((a, b) => a - b)
  const mid = Math.floor(perCi.length / 2)
  const median = perCi.length === 0 ? null : perCi.length % 2 ? perCi[mid]! : (perCi[mid - 1]! + perCi[mid]!) / 2
  return {
    verifiedBuilds: verified.length,
    minPeakHp: hp.length ? Math.min(...hp) : null,
    maxPeakHp: hp.length ? Math.max(...hp) : null,
    medianHpPerCi: median,
  }
}
