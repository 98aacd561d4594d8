import { createError } from 'h3'
import { and, asc, eq, inArray } from 'drizzle-orm'
import { deltaCurve, describeDelta, parsePull, torqueAt, type CorrectionStandard, type PullPoint } from '#shared/engine'
import { curveUnder, rawCurveUnder, weatherOf } from '#shared/pulls/figures'
import { headlinePull } from '#shared/pulls/headline'
import type { BuildCurves, CurveComparison, CurvePull } from '#shared/types/builds'
import { toCsv } from '#shared/csv'
import { builds, dynoPulls, files } from '../database/schema'
import type { Database } from '../database/types'
import { pullFiguresFor } from './pull-figures'

/** Reads a stored file's text by its storage key (Nitro storage on the server, a plain map in tests). */
export type ReadStoredText = (storageKey: string) => Promise<string | null>

const one = (n: number) => Math.round(n * 10) / 10

/** One pull's raw points, parsed from its stored file exactly as an upload is (the CSV export of every point only). */
async function rawPoints(read: ReadStoredText, storageKey: string): Promise<PullPoint[]> {
  const text = await read(storageKey)
  if (text === null) throw createError({ status: 500, message: `The pull file ${storageKey} is missing from storage.` })
  const parsed = parsePull(text)
  if (!parsed.ok) throw createError({ status: 500, message: `The stored pull file ${storageKey} no longer parses.` })
  return parsed.points
}

/**
 * Every pull of a build under `target`, with the A/B comparisons between baseline and variants, from
 * the pulls' stored figures (server/services/pull-figures.ts): the stored display curve converted by the
 * standard's stored ratio, the peaks as stored (computed from every point when the pull was saved).
 * Pages get each curve on at most DISPLAY_MAX_POINTS points (`resolution: 'display'`, the default); the
 * CSV download asks for every point of the file (`'full'`), the one case that reads the raw file.
 */
export async function curvesForBuild(db: Database, read: ReadStoredText, buildId: number, slug: string, target: CorrectionStandard, resolution: 'display' | 'full' = 'display'): Promise<BuildCurves> {
  const rows = await db.select({ pull: dynoPulls, storageKey: files.storageKey, sha256: files.sha256 }).from(dynoPulls)
    .innerJoin(files, eq(files.id, dynoPulls.fileId))
    .where(and(eq(dynoPulls.buildId, buildId), inArray(dynoPulls.status, ['submitted', 'verified'])))
    .orderBy(asc(dynoPulls.id))
  const stored = await pullFiguresFor(db, read, rows.map(r => r.pull.id))

  const pulls: CurvePull[] = []
  for (const { pull, storageKey, sha256 } of rows) {
    const figures = stored.get(pull.id)
    // One unreadable file must not take the public page down: that pull is left out (pullFiguresFor logs it).
    if (!figures) continue
    const under = figures.standards[target]
    let points: CurvePull['points']
    if (resolution === 'full') {
      try {
        points = (await rawPoints(read, storageKey)).map(p => ({ rpm: p.rpm, hp: one(p.hp * under.ratio), lbFt: one(torqueAt(p) * under.ratio) }))
      }
      catch (err) {
        console.error(`pull ${pull.id}: ${(err as Error).message}`)
        continue
      }
    }
    else {
      points = curveUnder(figures, target)
    }
    pulls.push({
      id: pull.id,
      label: pull.label,
      sha256,
      status: pull.status,
      dynoKind: pull.dynoKind,
      declaredStandard: pull.declaredStandard,
      weather: weatherOf(pull),
      comparisonRole: pull.comparisonRole,
      changeKind: pull.changeKind,
      changeNote: pull.changeNote,
      standard: under.uncorrected ? 'UNCORRECTED' : target,
      uncorrected: under.uncorrected,
      notes: under.notes,
      points,
      peaks: { peakHp: under.peakHp, peakHpRpm: under.peakHpRpm, peakTq: under.peakTq, peakTqRpm: under.peakTqRpm },
    })
  }

  const baseline = pulls.find(p => p.comparisonRole === 'baseline')
  const comparisons: CurveComparison[] = []
  if (baseline) {
    const base = stored.get(baseline.id)!
    for (const variant of pulls.filter(p => p.comparisonRole === 'variant')) {
      // On the stored display curves (every point of a pull of up to DISPLAY_MAX_POINTS points); "even" is
      // within 1 % of the baseline's peak power, as deltaCurve's default takes it.
      const delta = deltaCurve(rawCurveUnder(base, target), rawCurveUnder(stored.get(variant.id)!, target), { evenHp: 0.01 * Math.abs(baseline.peaks.peakHp) })
      comparisons.push({
        baselineId: baseline.id,
        variantId: variant.id,
        changeKind: variant.changeKind,
        changeNote: variant.changeNote,
        points: delta.points.map(p => ({ rpm: p.rpm, hpDelta: one(p.hpDelta), tqDelta: one(p.tqDelta) })),
        sentence: describeDelta(delta.summary),
        maxGainHp: one(delta.summary.maxGainHp),
        maxGainRpm: delta.summary.maxGainRpm,
        maxLossHp: one(delta.summary.maxLossHp),
        maxLossRpm: delta.summary.maxLossRpm,
      })
    }
  }
  // The pull that speaks for the build, by the one headline rule (the same one cards and search use).
  const headline = headlinePull(rows.map(r => r.pull).filter(p => stored.has(p.id)))
  return { slug, standard: target, headlineId: headline?.pull.id ?? null, headlineBasis: headline?.basis ?? null, pulls, comparisons }
}

/** The id of a published build by its slug, or null. */
export async function publishedBuildId(db: Database, slug: string): Promise<number | null> {
  const [row] = await db.select({ id: builds.id }).from(builds).where(and(eq(builds.slug, slug), eq(builds.status, 'published'))).limit(1)
  return row?.id ?? null
}

/** A pull's points as CSV under the chosen standard, for download. */
export function curveCsv(pull: CurvePull): string {
  // The label is the shop's own text: toCsv keeps it inside the one comment cell, on one line, never a formula.
  const header = `# ${pull.label}; standard ${pull.standard}${pull.uncorrected ? ' (weather unknown: as observed)' : ''}`
  return toCsv([[header], ['rpm', 'power_hp', 'torque_lbft'], ...pull.points.map(p => [p.rpm, Number(p.hp.toFixed(1)), Number(p.lbFt.toFixed(1))])])
}
