import { createError } from 'h3'
import { and, asc, eq, inArray } from 'drizzle-orm'
import { convertCurve, deltaCurve, describeDelta, parsePull, peaks, torqueAt, type CorrectionStandard, type PullPoint } from '#shared/engine'
import { displayCurve } from '#shared/listings/display-curve'
import { headlinePull } from '#shared/pulls/headline'
import type { BuildCurves, CurveComparison, CurvePull } from '#shared/types/listings'
import { toCsv } from '#shared/csv'
import { builds, dynoPulls, files, type DynoPull } from '../database/schema'
import type { Database } from '../database/types'

/** Reads a stored file's text by its storage key (Nitro storage on the server, a plain map in tests). */
export type ReadStoredText = (storageKey: string) => Promise<string | null>

const one = (n: number) => Math.round(n * 10) / 10

function weatherOf(p: DynoPull) {
  return p.baroInHg !== null && p.airTempF !== null && p.humidityPct !== null
    ? { baroInHg: p.baroInHg, airTempF: p.airTempF, humidityPct: p.humidityPct }
    : null
}

/** One pull's raw points, parsed from its stored file exactly as an upload is. */
async function rawPoints(read: ReadStoredText, storageKey: string): Promise<PullPoint[]> {
  const text = await read(storageKey)
  if (text === null) throw createError({ status: 500, message: `The pull file ${storageKey} is missing from storage.` })
  const parsed = parsePull(text)
  if (!parsed.ok) throw createError({ status: 500, message: `The stored pull file ${storageKey} no longer parses.` })
  return parsed.points
}

/**
 * Every pull of a build re-expressed under `target`, with the A/B comparisons between baseline and variants.
 * Pages get each curve on at most DISPLAY_MAX_POINTS points (`resolution: 'display'`, the default); the
 * CSV download asks for every point of the file (`'full'`). Peaks and comparisons always use every point.
 */
export async function curvesForBuild(db: Database, read: ReadStoredText, buildId: number, slug: string, target: CorrectionStandard, resolution: 'display' | 'full' = 'display'): Promise<BuildCurves> {
  const rows = await db.select({ pull: dynoPulls, storageKey: files.storageKey, sha256: files.sha256 }).from(dynoPulls)
    .innerJoin(files, eq(files.id, dynoPulls.fileId))
    .where(and(eq(dynoPulls.buildId, buildId), inArray(dynoPulls.status, ['submitted', 'verified'])))
    .orderBy(asc(dynoPulls.id))

  const pulls: CurvePull[] = []
  const raw = new Map<number, PullPoint[]>()
  for (const { pull, storageKey, sha256 } of rows) {
    let points: PullPoint[]
    try {
      points = await rawPoints(read, storageKey)
    }
    catch (err) {
      // One unreadable file must not take the public page down: leave that pull out and say so in the log.
      console.error(`pull ${pull.id}: ${(err as Error).message}`)
      continue
    }
    const weather = weatherOf(pull)
    const converted = convertCurve(points, { standard: pull.declaredStandard as CorrectionStandard, weather }, { standard: target, weather })
    raw.set(pull.id, converted.points)
    const pk = peaks(converted.points)
    pulls.push({
      id: pull.id,
      label: pull.label,
      sha256,
      status: pull.status,
      dynoKind: pull.dynoKind,
      declaredStandard: pull.declaredStandard,
      weather,
      comparisonRole: pull.comparisonRole,
      changeKind: pull.changeKind,
      changeNote: pull.changeNote,
      standard: converted.uncorrected ? 'UNCORRECTED' : target,
      uncorrected: converted.uncorrected,
      notes: converted.notes,
      points: (resolution === 'full' ? converted.points : displayCurve(converted.points)).map(p => ({ rpm: p.rpm, hp: one(p.hp), lbFt: one(torqueAt(p)) })),
      peaks: { peakHp: one(pk.peakHp), peakHpRpm: pk.peakHpRpm, peakTq: one(pk.peakTq), peakTqRpm: pk.peakTqRpm },
    })
  }

  const baseline = pulls.find(p => p.comparisonRole === 'baseline')
  const comparisons: CurveComparison[] = []
  if (baseline) {
    for (const variant of pulls.filter(p => p.comparisonRole === 'variant')) {
      const delta = deltaCurve(raw.get(baseline.id)!, raw.get(variant.id)!)
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
  const headline = headlinePull(rows.map(r => r.pull).filter(p => raw.has(p.id)))
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
