/**
 * What one kind of change gains across verified before/after comparisons on one short block.
 * Pure: the server hands in each comparison's delta curve (variant minus baseline, already under one
 * correction standard) and gets the distributions, the median delta curve and its spread back.
 */
import { bandAverage, valueAt, type PullPoint } from '../engine'

/** The grid the median delta curve is laid on, in rpm. */
export const SWAP_GRID_STEP = 250
/** A comparison counts towards the band-average gain when it covers at least this share of the band. */
export const SWAP_MIN_BAND_COVER = 0.5
/** A stretch of the curve is called "helps" or "costs" only where at least this many comparisons cover it. */
export const SWAP_MIN_RUN_SAMPLE = 3

/** One verified comparison as the statistics see it. */
export interface SwapSample {
  slug: string
  title: string
  ci: number
  aspiration: string
  fuel: string
  changeNote: string | null
  /** Variant peak power minus baseline peak power, hp. */
  peakGainHp: number
  /** The delta curve, variant minus baseline, hp, rpm ascending. */
  points: { rpm: number, hpDelta: number }[]
}

export interface Quartiles { n: number, min: number, q1: number, median: number, q3: number, max: number }

export interface SwapCurvePoint { rpm: number, n: number, q1: number, median: number, q3: number }

export interface SwapRun { kind: 'helps' | 'costs' | 'mixed', fromRpm: number, toRpm: number, medianLowHp: number, medianHighHp: number }

export interface SwapStats {
  count: number
  band: { from: number, to: number } | null
  grid: { from: number, to: number, step: number } | null
  peakGain: Quartiles | null
  bandGain: Quartiles | null
  curve: SwapCurvePoint[]
  runs: SwapRun[]
  comparisons: (Omit<SwapSample, 'points'> & { bandGainHp: number | null, fromRpm: number, toRpm: number })[]
}

/**
 * The p-quantile of ascending `sorted` values by linear interpolation between order statistics:
 * Hyndman & Fan (1996) definition 7, the default of R's quantile() and numpy's "linear" method
 * (h = (n − 1)p, Q = x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋])).
 */
export function quantile(sorted: readonly number[], p: number): number {
  if (sorted.length === 0) throw new RangeError('quantile needs at least one value')
  if (!(p >= 0 && p <= 1)) throw new RangeError(`p is between 0 and 1 (got ${p})`)
  const h = (sorted.length - 1) * p
  const lo = Math.floor(h)
  const hi = Math.min(lo + 1, sorted.length - 1)
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!)
}

/** Minimum, quartiles (definition 7) and maximum of some values; null for none. */
export function quartiles(values: readonly number[]): Quartiles | null {
  if (values.length === 0) return null
  const sorted = [...values].sort((a, b) => a - b)
  return { n: sorted.length, min: sorted[0]!, q1: quantile(sorted, 0.25), median: quantile(sorted, 0.5), q3: quantile(sorted, 0.75), max: sorted[sorted.length - 1]! }
}

const asCurve = (points: SwapSample['points']): PullPoint[] => points.map(p => ({ rpm: p.rpm, hp: p.hpDelta }))

/** The delta at an rpm by linear interpolation, or null outside the comparison's shared range. */
export function deltaAt(points: SwapSample['points'], rpm: number): number | null {
  if (points.length < 2 || rpm < points[0]!.rpm || rpm > points[points.length - 1]!.rpm) return null
  return valueAt(asCurve(points), rpm, p => p.hp)
}

/**
 * The mean delta over [from, to] clipped to the comparison (the exact mean of the piecewise-linear
 * curve, trapezoid rule), or null when the comparison covers less than SWAP_MIN_BAND_COVER of it.
 */
export function bandGain(points: SwapSample['points'], from: number, to: number): number | null {
  if (points.length < 2) return null
  const lo = Math.max(from, points[0]!.rpm)
  const hi = Math.min(to, points[points.length - 1]!.rpm)
  if (hi <= lo || (hi - lo) < SWAP_MIN_BAND_COVER * (to - from)) return null
  return bandAverage(asCurve(points), lo, hi, p => p.hp)
}

/** The rpm grid: the band's ends and every multiple of the step between them; without a band, the range the samples cover. */
export function swapGrid(samples: readonly SwapSample[], band: { from: number, to: number } | null): number[] {
  let from: number
  let to: number
  if (band) {
    from = band.from
    to = band.to
  }
  else {
    const covered = samples.filter(s => s.points.length >= 2)
    if (covered.length === 0) return []
    from = Math.ceil(Math.min(...covered.map(s => s.points[0]!.rpm)) / SWAP_GRID_STEP) * SWAP_GRID_STEP
    to = Math.floor(Math.max(...covered.map(s => s.points[s.points.length - 1]!.rpm)) / SWAP_GRID_STEP) * SWAP_GRID_STEP
    if (to <= from) return []
  }
  const grid = [from]
  for (let rpm = Math.floor(from / SWAP_GRID_STEP) * SWAP_GRID_STEP + SWAP_GRID_STEP; rpm < to; rpm += SWAP_GRID_STEP) grid.push(rpm)
  grid.push(to)
  return grid
}

/** Where the typical comparison gains (three in four gained: lower quartile above zero), loses (upper quartile below zero), or neither. */
function runsOf(curve: readonly SwapCurvePoint[]): SwapRun[] {
  const kindOf = (p: SwapCurvePoint): SwapRun['kind'] => (p.q1 > 0 ? 'helps' : p.q3 < 0 ? 'costs' : 'mixed')
  const runs: SwapRun[] = []
  for (const p of curve.filter(c => c.n >= SWAP_MIN_RUN_SAMPLE)) {
    const kind = kindOf(p)
    const last = runs[runs.length - 1]
    if (last && last.kind === kind && p.rpm - last.toRpm <= SWAP_GRID_STEP) {
      last.toRpm = p.rpm
      last.medianLowHp = Math.min(last.medianLowHp, p.median)
      last.medianHighHp = Math.max(last.medianHighHp, p.median)
    }
    else {
      runs.push({ kind, fromRpm: p.rpm, toRpm: p.rpm, medianLowHp: p.median, medianHighHp: p.median })
    }
  }
  return runs
}

/** The statistics of a set of comparisons, across a band (launch or stall to shift) or, without one, across the range they cover. */
export function summarizeSwaps(samples: readonly SwapSample[], band: { from: number, to: number } | null): SwapStats {
  const usable = samples.filter(s => s.points.length >= 2)
  const grid = swapGrid(usable, band)
  const comparisons = usable.map(({ points, ...rest }) => ({
    ...rest,
    fromRpm: points[0]!.rpm,
    toRpm: points[points.length - 1]!.rpm,
    bandGainHp: bandGain(points, band?.from ?? points[0]!.rpm, band?.to ?? points[points.length - 1]!.rpm),
  }))
  const curve: SwapCurvePoint[] = []
  for (const rpm of grid) {
    const q = quartiles(usable.map(s => deltaAt(s.points, rpm)).filter((d): d is number => d !== null))
    if (q) curve.push({ rpm, n: q.n, q1: q.q1, median: q.median, q3: q.q3 })
  }
  return {
    count: usable.length,
    band,
    grid: grid.length ? { from: grid[0]!, to: grid[grid.length - 1]!, step: SWAP_GRID_STEP } : null,
    peakGain: quartiles(usable.map(s => s.peakGainHp)),
    bandGain: quartiles(comparisons.map(c => c.bandGainHp).filter((g): g is number => g !== null)),
    curve,
    runs: runsOf(curve),
    comparisons,
  }
}
