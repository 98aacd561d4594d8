import { createError } from 'h3'
import { and, eq, inArray, isNotNull, ne } from 'drizzle-orm'
import { torqueAt, type DeclaredFigures } from '#shared/engine'
import { evaluatePull, type PullBuildContext } from '#shared/pulls/evaluate'
import { declaredOf, weatherOf } from '#shared/pulls/figures'
import type { PullMeta } from '#shared/schemas/build'
import type { PullPreview } from '#shared/types/editor'
import { builds, dynoPulls, files, type Build } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import type { ReadStoredText } from './curves'
import { refreshHeadline } from './headline'
import { afterBuildChanged } from './build-events'
import { ownBuild, type ShopRef } from './own-build'
import { storePullFigures } from './pull-figures'
import { deleteFileRows, discard, insertFileRow, vetUpload, withStagedFiles, type IncomingFile, type UploadStore } from './build-files'
import { recordBuildChange } from './search-feed'

export interface PullUpload {
  pull: IncomingFile
  sheet?: IncomingFile | null
  meta: PullMeta
}

const one = (n: number) => Math.round(n * 10) / 10

/** The combination figures the evidence checks need; a draft without them cannot take a pull yet. */
function contextOf(build: Build): PullBuildContext {
  const { aspiration, boreIn, strokeIn, cylinders } = build
  if (aspiration === null || boreIn === null || strokeIn === null || cylinders === null) {
    throw createError({ status: 422, message: 'Fill in the bore, stroke, cylinders and aspiration first: the evidence checks work from them.' })
  }
  return { id: build.id, aspiration, boreIn, strokeIn, cylinders }
}

function declaredOfMeta(meta: PullMeta): DeclaredFigures {
  return {
    standard: meta.declaredStandard,
    correctionFactor: meta.declaredFactor,
    peakHp: meta.declaredPeakHp,
    peakHpRpm: meta.declaredPeakHpRpm,
    peakTq: meta.declaredPeakTq,
    peakTqRpm: meta.declaredPeakTqRpm,
  }
}

/** Every stored pull's fingerprint on another build, for the duplicate check. */
async function fingerprintsOfOtherBuilds(db: Database, buildId: number) {
  const rows = await db.select({ buildId: dynoPulls.buildId, fingerprint: dynoPulls.fingerprint }).from(dynoPulls)
    .where(and(ne(dynoPulls.buildId, buildId), isNotNull(dynoPulls.fingerprint)))
  return rows as { buildId: number, fingerprint: string }[]
}

/** Size, type and parse of a pull file, through the one path seeded pulls take; 413, 415 or 422 (errors by row). */
async function evaluateUpload(db: Database, build: Build, file: IncomingFile, meta: PullMeta) {
  await vetUpload('pull', file, 'pull file')
  const context = contextOf(build)
  const evaluation = evaluatePull({
    text: file.bytes.toString('utf8'),
    declared: declaredOfMeta(meta),
    weather: meta.weather,
    build: context,
    fingerprintsOfOtherBuilds: await fingerprintsOfOtherBuilds(db, build.id),
  })
  if (!evaluation.ok) {
    const first = evaluation.errors.slice(0, 3).map(e => (e.row ? `row ${e.row}: ${e.message}` : e.message)).join('; ')
    throw createError({ status: 422, message: `The pull file could not be read: ${first}.`, data: { errors: evaluation.errors } })
  }
  return evaluation
}

/** The parse preview and evidence report of a pull file for one of the caller's builds; nothing is stored. */
export async function previewPull(db: Database, shop: ShopRef, buildId: number, upload: Omit<PullUpload, 'sheet'>): Promise<PullPreview> {
  const build = await ownBuild(db, shop, buildId)
  const evaluation = await evaluateUpload(db, build, upload.pull, upload.meta)
  return {
    points: evaluation.points.map(p => ({ rpm: p.rpm, hp: one(p.hp), lbFt: one(torqueAt(p)) })),
    warnings: evaluation.warnings,
    checks: evaluation.checks,
    summary: evaluation.summary,
  }
}

/**
 * Saves a pull: the file (and sheet) checked before anything is stored, then stored, then the file
 * rows and the pull row in one transaction (the stored files are removed if it fails). The pull
 * starts as submitted, awaiting an admin's verification. Returns the new pull's id and its report.
 */
export async function savePull(db: Database, store: UploadStore, shop: ShopRef, buildId: number, upload: PullUpload) {
  const build = await ownBuild(db, shop, buildId)
  const evaluation = await evaluateUpload(db, build, upload.pull, upload.meta)
  const sheetMime = upload.sheet ? await vetUpload('sheet', upload.sheet, 'dyno sheet') : null
  const { meta } = upload
  const items: { kind: 'pull' | 'sheet', mime: string, file: IncomingFile }[] = [{ kind: 'pull', mime: 'text/csv', file: upload.pull }]
  if (upload.sheet && sheetMime) items.push({ kind: 'sheet', mime: sheetMime, file: upload.sheet })

  // withStagedFiles stores the files once and runs the transaction again after a lock conflict.
  const pullId = await withStagedFiles(db, store, items, async (tx, staged) => {
    await ownBuild(tx, shop, buildId, true)
    if (meta.comparisonRole === 'baseline') {
      const [baseline] = await tx.select({ label: dynoPulls.label }).from(dynoPulls)
        .where(and(eq(dynoPulls.buildId, buildId), eq(dynoPulls.comparisonRole, 'baseline'), inArray(dynoPulls.status, ['submitted', 'verified']))).limit(1)
      if (baseline) throw createError({ status: 409, message: `This build already has a baseline pull ("${baseline.label}"); upload this one as a variant, or delete that one first.` })
    }
    const fileId = await insertFileRow(tx, shop.userId, staged[0]!)
    const sheetFileId = staged[1] ? await insertFileRow(tx, shop.userId, staged[1]) : null
    const [row] = await tx.insert(dynoPulls).values({
      buildId,
      label: meta.label,
      fileId,
      sheetFileId,
      dynoKind: meta.dynoKind,
      declaredStandard: meta.declaredStandard,
      declaredFactor: meta.declaredFactor,
      baroInHg: meta.weather?.baroInHg ?? null,
      airTempF: meta.weather?.airTempF ?? null,
      humidityPct: meta.weather?.humidityPct ?? null,
      declaredPeakHp: meta.declaredPeakHp,
      declaredPeakHpRpm: meta.declaredPeakHpRpm,
      declaredPeakTq: meta.declaredPeakTq,
      declaredPeakTqRpm: meta.declaredPeakTqRpm,
      summary: evaluation.summary,
      fingerprint: evaluation.fingerprint,
      checks: evaluation.checks,
      status: 'submitted',
      comparisonRole: meta.comparisonRole,
      changeKind: meta.comparisonRole === 'variant' ? meta.changeKind : null,
      changeNote: meta.comparisonRole === 'variant' ? meta.changeNote : null,
    }).$returningId()
    // The pull's derived figures under every standard, stored with it so no page parses the file again.
    await storePullFigures(tx, row!.id, evaluation.figures)
    await refreshHeadline(tx, buildId)
    await recordBuildChange(tx, buildId)
    return row!.id
  })
  await afterBuildChanged(buildId)
  return { pullId, checks: evaluation.checks, summary: evaluation.summary }
}

/**
 * Deletes one of the caller's pulls and its stored file(s). A published build keeps at least one
 * pull to show (409: unpublish first).
 */
export async function deletePull(db: Database, store: UploadStore, shop: ShopRef, buildId: number, pullId: number): Promise<void> {
  const keys = await inRetriedTransaction(db, async (tx) => {
    const build = await ownBuild(tx, shop, buildId, true)
    const [pull] = await tx.select().from(dynoPulls).where(and(eq(dynoPulls.id, pullId), eq(dynoPulls.buildId, buildId))).for('update')
    if (!pull) throw createError({ status: 404, message: 'That build has no such pull.' })
    if (build.status === 'published' && pull.status !== 'rejected') {
      const live = await tx.select({ id: dynoPulls.id }).from(dynoPulls).where(and(eq(dynoPulls.buildId, buildId), inArray(dynoPulls.status, ['submitted', 'verified'])))
      if (live.length <= 1) throw createError({ status: 409, message: 'A published build keeps at least one pull; add another first, or unpublish the build.' })
    }
    await tx.delete(dynoPulls).where(eq(dynoPulls.id, pullId))
    const removed = await deleteFileRows(tx, [pull.fileId, ...(pull.sheetFileId ? [pull.sheetFileId] : [])])
    await refreshHeadline(tx, buildId)
    await recordBuildChange(tx, buildId)
    return removed
  })
  await discard(store, keys)
  await afterBuildChanged(buildId)
}

/**
 * Runs the evidence checks again for a build's pulls still awaiting review, against the build's
 * combination as it stands now (after the shop changed the bore, stroke, cylinders or
 * aspiration), so the admin reviews a report that matches the build. Rejected pulls keep the report
 * their decision was made on; verified ones were sent back to the queue by the same change
 * (updateBuild). Answers how many reports were refreshed.
 */
export async function recheckSubmittedPulls(db: Database, buildId: number, read: ReadStoredText): Promise<number> {
  const [build] = await db.select().from(builds).where(eq(builds.id, buildId)).limit(1)
  if (!build || build.aspiration === null || build.boreIn === null || build.strokeIn === null || build.cylinders === null) return 0
  const context = contextOf(build)
  const rows = await db.select({ pull: dynoPulls, storageKey: files.storageKey }).from(dynoPulls)
    .innerJoin(files, eq(files.id, dynoPulls.fileId))
    .where(and(eq(dynoPulls.buildId, buildId), eq(dynoPulls.status, 'submitted')))
  if (!rows.length) return 0
  const others = await fingerprintsOfOtherBuilds(db, buildId)
  let refreshed = 0
  for (const { pull, storageKey } of rows) {
    const text = await read(storageKey)
    if (text === null) continue
    const evaluation = evaluatePull({ text, declared: declaredOf(pull), weather: weatherOf(pull), build: context, fingerprintsOfOtherBuilds: others })
    if (!evaluation.ok) continue
    // Only while it still awaits review: an admin's decision made meanwhile keeps its report. The derived
    // figures do not depend on the combination; the explicit re-check stores them afresh all the same.
    await inRetriedTransaction(db, async (tx) => {
      const [changed] = await tx.update(dynoPulls).set({ checks: evaluation.checks }).where(and(eq(dynoPulls.id, pull.id), eq(dynoPulls.status, 'submitted')))
      if (changed.affectedRows > 0) await storePullFigures(tx, pull.id, evaluation.figures)
    })
    refreshed++
  }
  return refreshed
}
