import { createError } from 'h3'
import type { PublishedBuild } from './builds'
import { REQUIRED_FOR_PUBLISH } from '#shared/schemas/build'
import { and, asc, count, desc, eq, inArray, ne } from 'drizzle-orm'
import {
  CORRECTION_STANDARDS, FINGERPRINT_TOLERANCE, displacementCi, evidenceOutcome, fingerprintDistance, type EvidenceCheck, type EvidenceOutcome,
} from '../../shared/engine'
import { curveUnder, declaredStandardOf, weatherOf, type StandardFigures } from '../../shared/pulls/figures'
import { BUILD_STANDARD } from '../../shared/pulls/summary'
import type { DuplicateLink, EvidenceQueueItem, EvidenceReview, PeakFigures } from '../../shared/types/admin'
import { shops, builds, dynoPulls, files, users, type Build, type DynoPull } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { adminEmails } from './mail-templates'
import { writeAudit } from './audit'
import { enqueueRendered } from './outbox'
import { refreshHeadline } from './headline'
import { pullFiguresFor } from './pull-figures'
import { recordBuildChange } from './search-feed'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]
/** Reads a stored file's text by its storage key (Nitro storage on the server, the uploads folder in tests). */
export type ReadStoredText = (storageKey: string) => Promise<string | null>

const standardLabel = (id: string) => CORRECTION_STANDARDS.find(s => s.id === id)?.label ?? id
/** The review page shows the first lines of the raw file; the whole file is a download. */
const PREVIEW_LINES = 60

const duplicateCheck = (checks: EvidenceCheck[] | null) => checks?.find(c => c.id === 'duplicate-curve')

/** Builds with the given ids, as duplicate links. */
async function linksFor(db: Database, found: { buildId: number, outcome: EvidenceOutcome }[]): Promise<DuplicateLink[]> {
  if (!found.length) return []
  const rows = await db.select({ id: builds.id, slug: builds.slug, title: builds.title, status: builds.status, shopName: shops.shopName })
    .from(builds).innerJoin(shops, eq(shops.id, builds.shopId))
    .where(inArray(builds.id, found.map(f => f.buildId)))
  const byId = new Map(rows.map(r => [r.id, r]))
  return found.flatMap((f) => {
    const b = byId.get(f.buildId)
    return b ? [{ buildId: b.id, slug: b.slug, title: b.title, status: b.status, shopName: b.shopName, outcome: f.outcome }] : []
  })
}

/** Other builds whose stored curves match this fingerprint now (closest first), within twice the tolerance. */
async function matchingBuilds(db: Database, pull: Pick<DynoPull, 'buildId' | 'fingerprint'>): Promise<{ buildId: number, pullId: number, outcome: EvidenceOutcome }[]> {
  if (!pull.fingerprint) return []
  const others = await db.select({ id: dynoPulls.id, buildId: dynoPulls.buildId, fingerprint: dynoPulls.fingerprint }).from(dynoPulls)
    .where(and(ne(dynoPulls.buildId, pull.buildId), inArray(dynoPulls.status, ['submitted', 'verified'])))
  const best = new Map<number, { pullId: number, distance: number }>()
  for (const o of others) {
    if (!o.fingerprint) continue
    let distance: number
    try {
      distance = fingerprintDistance(pull.fingerprint, o.fingerprint)
    }
    catch {
      continue
    }
    if (!(distance <= 2 * FINGERPRINT_TOLERANCE)) continue
    const seen = best.get(o.buildId)
    if (!seen || distance < seen.distance) best.set(o.buildId, { pullId: o.id, distance })
  }
  return [...best].sort((a, b) => a[1].distance - b[1].distance)
    .map(([buildId, m]) => ({ buildId, pullId: m.pullId, outcome: m.distance <= FINGERPRINT_TOLERANCE ? 'fail' as const : 'warn' as const }))
}

/** The admin's queue: submitted pulls, oldest first, with their build, shop, flagged checks and the build a duplicate matches. */
export async function evidenceQueue(db: Database): Promise<EvidenceQueueItem[]> {
  const rows = await db.select({ pull: dynoPulls, build: builds, shopName: shops.shopName, shopSlug: shops.slug })
    .from(dynoPulls)
    .innerJoin(builds, eq(builds.id, dynoPulls.buildId))
    .innerJoin(shops, eq(shops.id, builds.shopId))
    .where(eq(dynoPulls.status, 'submitted'))
    .orderBy(asc(dynoPulls.createdAt), asc(dynoPulls.id))
  if (!rows.length) return []
  const rejections = await db.select({ buildId: dynoPulls.buildId, n: count() }).from(dynoPulls)
    .where(and(inArray(dynoPulls.buildId, [...new Set(rows.map(r => r.build.id))]), eq(dynoPulls.status, 'rejected')))
    .groupBy(dynoPulls.buildId)
  const rejected = new Map(rejections.map(r => [r.buildId, r.n]))

  // The duplicate check names the nearest build in its figures; a report stored before it did is matched afresh.
  const wanted: { pullId: number, buildId: number, outcome: EvidenceOutcome }[] = []
  for (const { pull } of rows) {
    const dup = duplicateCheck(pull.checks)
    if (!dup || dup.outcome === 'pass') continue
    const named = dup.figures.closestBuildId
    const buildId = typeof named === 'number' ? named : (await matchingBuilds(db, pull))[0]?.buildId
    if (buildId) wanted.push({ pullId: pull.id, buildId, outcome: dup.outcome })
  }
  const links = await linksFor(db, wanted)
  const linkFor = (pullId: number) => {
    const w = wanted.find(x => x.pullId === pullId)
    return w ? links.find(l => l.buildId === w.buildId) ?? null : null
  }

  return rows.map(({ pull, build, shopName, shopSlug }) => {
    const checks = pull.checks ?? []
    return {
      pullId: pull.id,
      label: pull.label,
      submittedAt: pull.createdAt.toISOString(),
      build: { id: build.id, slug: build.slug, title: build.title, status: build.status, verified: build.verifiedAt !== null },
      shop: { slug: shopSlug, shopName },
      outcome: checks.length ? evidenceOutcome(checks) : 'warn',
      flagged: checks.filter(c => c.outcome !== 'pass').map(c => ({ id: c.id, outcome: c.outcome })),
      duplicate: linkFor(pull.id),
      earlierRejections: rejected.get(build.id) ?? 0,
    }
  })
}

const curveOf = (label: string, standard: string, points: { rpm: number, hp: number, lbFt: number }[]) => ({ label, standard, points })

const peakFigures = (f: StandardFigures): PeakFigures => ({ peakHp: f.peakHp, peakHpRpm: f.peakHpRpm, peakTq: f.peakTq, peakTqRpm: f.peakTqRpm })

async function storedText(read: ReadStoredText, storageKey: string): Promise<string> {
  const text = await read(storageKey)
  if (text === null) throw createError({ status: 500, message: `The pull file ${storageKey} is missing from storage.` })
  return text
}

function combinationOf(row: Build): EvidenceReview['combination'] {
  // A draft may carry submitted pulls before its combination is complete: review waits for it.
  const missing = REQUIRED_FOR_PUBLISH.filter(k => row[k] === null)
  if (missing.length) throw createError({ status: 409, message: `The build's combination is not complete yet (${missing.join(', ')}); review its evidence once the shop fills it in.` })
  const b = row as PublishedBuild
  return {
    engineFamily: b.engineFamily, cylinders: b.cylinders, boreIn: b.boreIn, strokeIn: b.strokeIn, rodLengthIn: b.rodLengthIn,
    displacementCi: displacementCi(b.boreIn, b.strokeIn, b.cylinders), aspiration: b.aspiration, fuel: b.fuel, intendedUse: b.intendedUse,
    cylinderHeads: b.cylinderHeads, chamberCc: b.chamberCc, pistonCc: b.pistonCc, gasketBoreIn: b.gasketBoreIn, gasketThicknessIn: b.gasketThicknessIn,
    deckClearanceIn: b.deckClearanceIn, camIntakeDurationDeg: b.camIntakeDurationDeg, camExhaustDurationDeg: b.camExhaustDurationDeg,
    camLobeSeparationDeg: b.camLobeSeparationDeg, camIntakeCenterlineDeg: b.camIntakeCenterlineDeg, intakeManifold: b.intakeManifold,
    throttleBody: b.throttleBody, injectorSizeLbHr: b.injectorSizeLbHr, injectorCount: b.injectorCount, engineManagement: b.engineManagement,
  }
}

/**
 * One pull with everything its decision needs: the raw file, its curve as filed and under the build
 * standard (with the nearest matching curve of another build beside it), declared against recomputed
 * figures, the stored check report, the combination and the build's earlier decisions. 404 when missing.
 */
export async function evidenceReview(db: Database, read: ReadStoredText, pullId: number): Promise<EvidenceReview> {
  const [row] = await db.select({ pull: dynoPulls, build: builds, shop: shops, owner: { name: users.name, email: users.email }, file: files })
    .from(dynoPulls)
    .innerJoin(builds, eq(builds.id, dynoPulls.buildId))
    .innerJoin(shops, eq(shops.id, builds.shopId))
    .innerJoin(users, eq(users.id, shops.userId))
    .innerJoin(files, eq(files.id, dynoPulls.fileId))
    .where(eq(dynoPulls.id, pullId)).limit(1)
  if (!row) throw createError({ status: 404, message: 'No pull has that id.' })
  const { pull, build, shop, owner, file } = row

  // The raw file is shown as filed (its first lines); every figure and curve comes from the pull's stored figures.
  const text = await storedText(read, file.storageKey)
  const weather = weatherOf(pull)
  const declaredStandard = declaredStandardOf(pull)
  const matches = await matchingBuilds(db, pull)
  const nearest = matches[0]
  const stored = await pullFiguresFor(db, read, nearest ? [pull.id, nearest.pullId] : [pull.id])
  const own = stored.get(pull.id)
  if (!own) throw createError({ status: 500, message: `The stored pull file ${file.storageKey} no longer parses.` })
  const normalised = own.standards[BUILD_STANDARD]
  const lines = text.split(/\r?\n/)
  while (lines.length && lines[lines.length - 1] === '') lines.pop()

  const named = duplicateCheck(pull.checks)?.figures.closestBuildId
  const found = [...matches.map(m => ({ buildId: m.buildId, outcome: m.outcome }))]
  if (typeof named === 'number' && !found.some(f => f.buildId === named)) found.push({ buildId: named, outcome: duplicateCheck(pull.checks)!.outcome })
  const duplicates = await linksFor(db, found)

  const curves = [
    curveOf(`As filed (${standardLabel(declaredStandard)})`, declaredStandard, curveUnder(own, declaredStandard)),
    ...(declaredStandard === BUILD_STANDARD ? [] : [curveOf(normalised.uncorrected ? 'Uncorrected (no weather)' : `Under ${standardLabel(BUILD_STANDARD)}`, normalised.uncorrected ? 'UNCORRECTED' : BUILD_STANDARD, curveUnder(own, BUILD_STANDARD))]),
  ]
  const other = nearest ? stored.get(nearest.pullId) : undefined
  if (nearest && other) {
    const title = duplicates.find(d => d.buildId === nearest.buildId)?.title ?? `build ${nearest.buildId}`
    curves.push(curveOf(`Matching curve: ${title}`, BUILD_STANDARD, curveUnder(other, BUILD_STANDARD)))
  }

  const [sheet] = pull.sheetFileId ? await db.select().from(files).where(eq(files.id, pull.sheetFileId)) : []
  const history = await db.select().from(dynoPulls)
    .where(and(eq(dynoPulls.buildId, build.id), ne(dynoPulls.id, pull.id), ne(dynoPulls.status, 'submitted')))
    .orderBy(desc(dynoPulls.reviewedAt), desc(dynoPulls.id))

  return {
    pull: {
      id: pull.id, label: pull.label, status: pull.status, dynoKind: pull.dynoKind, declaredStandard: pull.declaredStandard, declaredFactor: pull.declaredFactor,
      weather, submittedAt: pull.createdAt.toISOString(), reviewedAt: pull.reviewedAt?.toISOString() ?? null, reviewNote: pull.reviewNote,
      comparisonRole: pull.comparisonRole, changeNote: pull.changeNote,
    },
    build: {
      id: build.id, slug: build.slug, title: build.title, status: build.status, verified: build.verifiedAt !== null,
      shop: { slug: shop.slug, shopName: shop.shopName, ownerName: owner.name, ownerEmail: owner.email },
      figures: { peakHp: build.peakHp, peakHpRpm: build.peakHpRpm, peakTq: build.peakTq, peakTqRpm: build.peakTqRpm },
    },
    combination: combinationOf(build),
    file: {
      name: file.originalName, mime: file.mime, sizeBytes: file.sizeBytes, sha256: file.sha256, lines: lines.length,
      preview: lines.slice(0, PREVIEW_LINES).join('\n'), truncated: lines.length > PREVIEW_LINES,
    },
    sheet: sheet ? { name: sheet.originalName, mime: sheet.mime, sizeBytes: sheet.sizeBytes } : null,
    declared: {
      standard: pull.declaredStandard, factor: pull.declaredFactor,
      peakHp: pull.declaredPeakHp, peakHpRpm: pull.declaredPeakHpRpm, peakTq: pull.declaredPeakTq, peakTqRpm: pull.declaredPeakTqRpm,
    },
    recomputed: {
      asFiled: { standard: pull.declaredStandard, ...peakFigures(own.standards[declaredStandard]) },
      normalised: { standard: normalised.uncorrected ? 'UNCORRECTED' : BUILD_STANDARD, uncorrected: normalised.uncorrected, ...peakFigures(normalised) },
    },
    curves,
    checks: pull.checks ?? [],
    duplicates,
    history: history.map(h => ({ pullId: h.id, label: h.label, status: h.status, reviewNote: h.reviewNote, reviewedAt: h.reviewedAt?.toISOString() ?? null })),
  }
}

/** The stored raw file of a pull, for download. 404 when the pull is missing. */
export async function pullFile(db: Database, pullId: number, which: 'pull' | 'sheet'): Promise<{ storageKey: string, name: string, mime: string }> {
  const [row] = await db.select({ file: files }).from(dynoPulls)
    .innerJoin(files, eq(files.id, which === 'pull' ? dynoPulls.fileId : dynoPulls.sheetFileId))
    .where(eq(dynoPulls.id, pullId)).limit(1)
  if (!row) throw createError({ status: 404, message: which === 'pull' ? 'No pull has that id.' : 'That pull has no dyno sheet attached.' })
  return { storageKey: row.file.storageKey, name: row.file.originalName, mime: row.file.mime }
}

/**
 * Locks a pull for a decision with its build: the build row first, then the pull, the order the
 * build editor takes them in (a build change sends its verified pulls back under the build's lock),
 * so a decision and an edit never wait on each other in a circle. 404 when missing, 409 when the pull
 * is no longer awaiting a decision.
 */
async function lockSubmitted(tx: Tx, pullId: number) {
  const [peek] = await tx.select({ buildId: dynoPulls.buildId }).from(dynoPulls).where(eq(dynoPulls.id, pullId))
  if (!peek) throw createError({ status: 404, message: 'No pull has that id.' })
  const [build] = await tx.select().from(builds).where(eq(builds.id, peek.buildId)).for('update')
  const [pull] = await tx.select().from(dynoPulls).where(eq(dynoPulls.id, pullId)).for('update')
  if (!pull) throw createError({ status: 404, message: 'No pull has that id.' })
  if (pull.status !== 'submitted') throw createError({ status: 409, message: `That pull was already ${pull.status}; only a pull awaiting a check can be decided.` })
  return { pull, build: build! }
}

const listedPeaksOf = (b: Pick<Build, 'peakHp' | 'peakHpRpm' | 'peakTq' | 'peakTqRpm'>): PeakFigures =>
  ({ peakHp: b.peakHp, peakHpRpm: b.peakHpRpm, peakTq: b.peakTq, peakTqRpm: b.peakTqRpm })

/**
 * Verifies a pull: the build gets its checked mark and its headline figures (under the build
 * standard) from this pull, and one audit row records the change, all in one transaction. Returns the build id.
 */
export async function approvePull(db: Database, input: { actorId: number, pullId: number, note?: string | null, siteUrl?: string }): Promise<number> {
  return inRetriedTransaction(db, async (tx) => {
    const { pull, build } = await lockSubmitted(tx, input.pullId)
    const now = new Date()
    await tx.update(dynoPulls).set({ status: 'verified', reviewNote: input.note ?? null, reviewedAt: now }).where(and(eq(dynoPulls.id, pull.id), eq(dynoPulls.status, 'submitted')))
    // The headline follows the one rule: the strongest verified pull, which need not be this one.
    const { pullId: _headlineId, basis: _basis, verifiedAt: stamped, ...figures } = await refreshHeadline(tx, pull.buildId, now)
    const verifiedAt = stamped ?? now
    await writeAudit(tx, {
      actorId: input.actorId,
      action: 'pull.verify',
      entityType: 'dyno_pull',
      entityId: pull.id,
      before: { status: pull.status, buildId: pull.buildId, buildVerifiedAt: build!.verifiedAt?.toISOString() ?? null, buildFigures: listedPeaksOf(build!) },
      after: { status: 'verified', buildId: pull.buildId, buildVerifiedAt: verifiedAt.toISOString(), buildFigures: figures },
      note: input.note ?? null,
      at: now,
    })
    // The shop hears of it through the outbox, in this same transaction: once, and never for a decision rolled back.
    const [owner] = await tx.select({ email: users.email, name: users.name })
      .from(shops).innerJoin(users, eq(users.id, shops.userId))
      .where(eq(shops.id, build!.shopId))
    if (owner) {
      const mail = adminEmails.pullVerified({ name: owner.name, pullLabel: pull.label, buildTitle: build!.title, buildUrl: `${input.siteUrl ?? ''}/builds/${build!.slug}` })
      await enqueueRendered(tx, owner.email, mail, `pull-verified:${pull.id}`)
    }
    await recordBuildChange(tx, pull.buildId)
    return pull.buildId
  })
}

/**
 * Rejects a pull with a reason the shop will read, and moves the build's unverified headline figures
 * off it; one audit row, one transaction. Returns what the e-mail to the shop needs.
 */
export async function rejectPull(db: Database, input: { actorId: number, pullId: number, reason: string }) {
  return inRetriedTransaction(db, async (tx) => {
    const { pull, build } = await lockSubmitted(tx, input.pullId)
    const now = new Date()
    await tx.update(dynoPulls).set({ status: 'rejected', reviewNote: input.reason, reviewedAt: now }).where(eq(dynoPulls.id, pull.id))
    // The rejected pull leaves the headline; the one rule picks who speaks for the build now.
    const { pullId: _headlineId, basis: _basis, verifiedAt: _verifiedAt, ...headline } = await refreshHeadline(tx, build!.id, now)
    const changed = JSON.stringify(headline) !== JSON.stringify(listedPeaksOf(build!))
    await writeAudit(tx, {
      actorId: input.actorId,
      action: 'pull.reject',
      entityType: 'dyno_pull',
      entityId: pull.id,
      before: { status: pull.status, buildId: pull.buildId, ...(changed ? { buildFigures: listedPeaksOf(build!) } : {}) },
      after: { status: 'rejected', buildId: pull.buildId, ...(changed ? { buildFigures: headline } : {}) },
      note: input.reason,
      at: now,
    })
    const [owner] = await tx.select({ email: users.email, name: users.name })
      .from(shops).innerJoin(users, eq(users.id, shops.userId))
      .where(eq(shops.id, build!.shopId))
    await recordBuildChange(tx, pull.buildId)
    return { buildId: pull.buildId, buildSlug: build!.slug, buildTitle: build!.title, pullLabel: pull.label, email: owner!.email, name: owner!.name }
  })
}
