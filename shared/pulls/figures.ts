/**
 * The pull pipeline's derived figures: what every page, the search index and the review desk read
 * about a pull, computed once from its raw file when the pull is saved and stored beside it
 * (server/services/pull-figures.ts). A stored figure is never recomputed on a page view.
 *
 * A correction standard changes every power and torque figure of a pull by one number (the pull's
 * weather is one reading for the whole pull, see shared/engine/correction.ts `convertCurve`), so the
 * stored curve is the pull as filed and each standard keeps its ratio: a page converts the stored
 * curve by that ratio instead of parsing the file again.
 */
import { convertCurve, isCorrectionStandard } from '../engine/correction'
import { peaks, resample, torqueAt } from '../engine/curves'
import { CORRECTION_STANDARDS, type CorrectionStandard, type DeclaredFigures, type PullPoint, type Weather } from '../engine/types'
import { displayCurve } from '../builds/display-curve'
import { CURVE_STEP_RPM } from '../../search/types'
import { BUILD_STANDARD } from './summary'

/** Raise when the derivation changes: stored rows of an older version are recomputed on their next read. */
export const PULL_FIGURES_VERSION = 1

/** A pull's figures under one standard. */
export interface StandardFigures {
  /** What every power and torque figure of the pull as filed is multiplied by (convertCurve's ratio). */
  ratio: number
  /** True when the figures are not corrected (the standard is UNCORRECTED or the weather is unknown). */
  uncorrected: boolean
  notes: string[]
  peakHp: number
  peakHpRpm: number
  peakTq: number
  peakTqRpm: number
}

/** One point of the stored display curve, as filed (under the declared standard), unrounded. */
export interface StoredCurvePoint {
  rpm: number
  hp: number
  lbFt: number
}

export interface DerivedPullFigures {
  version: number
  /** The figures under every standard Torquewright knows. */
  standards: Record<CorrectionStandard, StandardFigures>
  /** The display curve (at most DISPLAY_MAX_POINTS points) as filed. */
  curve: StoredCurvePoint[]
  /** Power under the build standard on the search index's fixed grid (0.1 hp), for band queries. */
  searchCurve: { startRpm: number, hp: number[] } | null
}

/** The stored pull columns the engine's input is made from. */
export interface StoredPullInput {
  declaredStandard: string
  declaredFactor?: number | null
  baroInHg: number | null
  airTempF: number | null
  humidityPct: number | null
  declaredPeakHp?: number | null
  declaredPeakHpRpm?: number | null
  declaredPeakTq?: number | null
  declaredPeakTqRpm?: number | null
}

/** The weather of a stored pull, or null when any of the three readings is missing. */
export function weatherOf(p: Pick<StoredPullInput, 'baroInHg' | 'airTempF' | 'humidityPct'>): Weather | null {
  return p.baroInHg !== null && p.airTempF !== null && p.humidityPct !== null
    ? { baroInHg: p.baroInHg, airTempF: p.airTempF, humidityPct: p.humidityPct }
    : null
}

/** The standard a stored pull was filed under; a name the engine does not know counts as uncorrected. */
export function declaredStandardOf(p: Pick<StoredPullInput, 'declaredStandard'>): CorrectionStandard {
  return isCorrectionStandard(p.declaredStandard) ? p.declaredStandard : 'UNCORRECTED'
}

/** The shop's declared figures of a stored pull, as the evidence checks take them. */
export function declaredOf(p: StoredPullInput): DeclaredFigures {
  return {
    standard: declaredStandardOf(p),
    correctionFactor: p.declaredFactor ?? null,
    peakHp: p.declaredPeakHp ?? null,
    peakHpRpm: p.declaredPeakHpRpm ?? null,
    peakTq: p.declaredPeakTq ?? null,
    peakTqRpm: p.declaredPeakTqRpm ?? null,
  }
}

const one = (n: number) => Math.round(n * 10) / 10

/** Every derived figure of a pull from its parsed points, its declared standard and its weather. */
export function derivePullFigures(points: readonly PullPoint[], declared: CorrectionStandard, weather: Weather | null): DerivedPullFigures {
  const filed = points.slice()
  const from = { standard: declared, weather }
  const standards = {} as Record<CorrectionStandard, StandardFigures>
  let build: PullPoint[] = filed
  for (const { id } of CORRECTION_STANDARDS) {
    const converted = convertCurve(filed, from, { standard: id, weather })
    if (id === BUILD_STANDARD) build = converted.points
    const pk = peaks(converted.points)
    standards[id] = {
      ratio: converted.ratio,
      uncorrected: converted.uncorrected,
      notes: converted.notes,
      peakHp: one(pk.peakHp),
      peakHpRpm: pk.peakHpRpm,
      peakTq: one(pk.peakTq),
      peakTqRpm: pk.peakTqRpm,
    }
  }
  const grid = resample(build, CURVE_STEP_RPM)
  return {
    version: PULL_FIGURES_VERSION,
    standards,
    curve: displayCurve(filed).map(p => ({ rpm: p.rpm, hp: p.hp, lbFt: torqueAt(p) })),
    searchCurve: grid.length > 0 ? { startRpm: grid[0]!.rpm, hp: grid.map(p => one(p.hp)) } : null,
  }
}

/** The stored display curve under one standard, rounded to 0.1 as pages show it: a multiplication, never a re-parse. */
export function curveUnder(figures: Pick<DerivedPullFigures, 'curve' | 'standards'>, standard: CorrectionStandard): StoredCurvePoint[] {
  const { ratio } = figures.standards[standard]
  return figures.curve.map(p => ({ rpm: p.rpm, hp: one(p.hp * ratio), lbFt: one(p.lbFt * ratio) }))
}

/** The stored display curve under one standard, unrounded (for comparisons between pulls). */
export function rawCurveUnder(figures: Pick<DerivedPullFigures, 'curve' | 'standards'>, standard: CorrectionStandard): PullPoint[] {
  const { ratio } = figures.standards[standard]
  return figures.curve.map(p => ({ rpm: p.rpm, hp: p.hp * ratio, lbFt: p.lbFt * ratio }))
}
