/** Curve processing: validation, resampling, peaks, band averages, power band and the delta between two pulls. */
import { aboveZeroUpTo, callable, fieldName, finite, nonNegative, positive, record, within } from './guard'
import { FIGURE_CEILING, MAX_GRID_POINTS, RPM_CEILING } from './limits'
import { HP_TORQUE_CROSSOVER_RPM } from './power'
import type { PullPoint } from './types'

/** Checks one point: an object with rpm above zero up to the ceiling and finite power (and torque) within the figure ceiling. */
export function assertPoint(p: PullPoint, label = 'point'): PullPoint {
  const name = fieldName(label, 'point')
  if (!p || typeof p !== 'object') throw new RangeError(`${name} is not a point (expected { rpm, hp })`)
  within(`${name}.rpm`, p.rpm, Number.MIN_VALUE, RPM_CEILING, `rpm (the module's ceiling is ${RPM_CEILING.toLocaleString('en-US')} rpm)`)
  within(`${name}.hp`, p.hp, -FIGURE_CEILING, FIGURE_CEILING, 'hp')
  if (p.lbFt !== undefined) within(`${name}.lbFt`, p.lbFt, -FIGURE_CEILING, FIGURE_CEILING, 'lb·ft')
  return p
}

/** Checks a curve has at least two points, each as assertPoint wants, and strictly increasing rpm. */
export function assertCurve(points: readonly PullPoint[], label = 'points'): void {
  const name = fieldName(label, 'points')
  if (!Array.isArray(points)) throw new RangeError(`${name} must be an array of { rpm, hp } points`)
  if (points.length < 2) throw new RangeError(`${name} needs at least two points (got ${points.length})`)
  let previous = -Infinity
  for (let i = 0; i < points.length; i++) {
    const p = assertPoint(points[i] as PullPoint, `${name}[${i}]`)
    if (p.rpm <= previous) {
      throw new RangeError(`rpm must keep increasing: ${name}[${i}] is ${p.rpm} rpm after ${previous} rpm`)
    }
    previous = p.rpm
  }
}

/** Torque at a point: the measured figure, else hp × 5252.11 / rpm (rpm is above zero on every checked point). */
export function torqueAt(p: PullPoint): number {
  assertPoint(p)
  if (p.lbFt !== undefined) return p.lbFt
  return (p.hp * HP_TORQUE_CROSSOVER_RPM) / p.rpm
}

/** torqueAt without the checks, for points a caller has already checked. */
const torqueOf = (p: PullPoint): number => (p.lbFt !== undefined ? p.lbFt : (p.hp * HP_TORQUE_CROSSOVER_RPM) / p.rpm)

const lerp = (x0: number, y0: number, x1: number, y1: number, x: number): number =>
  x1 === x0 ? y0 : y0 + ((y1 - y0) * (x - x0)) / (x1 - x0)

/** Index i with points[i].rpm ≤ rpm < points[i+1].rpm (clamped to the last segment). */
function segmentIndex(points: readonly PullPoint[], rpm: number): number {
  let lo = 0
  let hi = points.length - 2
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1
    if ((points[mid] as PullPoint).rpm <= rpm) lo = mid
    else hi = mid - 1
  }
  return lo
}

/** Linear interpolation on a checked curve at an rpm inside it. */
function interpolate(points: readonly PullPoint[], rpm: number, value: (p: PullPoint) => number): number {
  const i = segmentIndex(points, rpm)
  const a = points[i] as PullPoint
  const b = (points[i + 1] ?? a) as PullPoint
  const y = lerp(a.rpm, value(a), b.rpm, value(b), rpm)
  if (!Number.isFinite(y)) throw new RangeError(`value must give a finite figure at every point (got ${y} at ${rpm} rpm)`)
  return y
}

/** rpm inside the pull, or a RangeError saying the pull does not reach it (figures are never extrapolated). */
function insidePull(points: readonly PullPoint[], rpm: number, name = 'rpm'): number {
  finite(name, rpm)
  const first = (points[0] as PullPoint).rpm
  const last = (points[points.length - 1] as PullPoint).rpm
  if (rpm < first || rpm > last) {
    throw new RangeError(`${name} ${rpm} lies outside the pull, which runs ${first}–${last} rpm (figures are not extrapolated)`)
  }
  return rpm
}

/** A figure at an rpm inside the curve, by linear interpolation; a RangeError outside it. */
export function valueAt(points: readonly PullPoint[], rpm: number, value: (p: PullPoint) => number): number {
  assertCurve(points)
  callable('value', value)
  return interpolate(points, insidePull(points, rpm), value)
}

/** Power in hp at an rpm inside the curve, by linear interpolation; a RangeError outside it. */
export const hpAt = (points: readonly PullPoint[], rpm: number): number => valueAt(points, rpm, p => p.hp)

/**
 * Torque and power at an rpm inside a checked curve, kept in step: torque is interpolated and
 * power recomputed from it (hp = lb·ft × rpm / 5252.113), so the two never disagree between samples.
 */
function figuresAt(points: readonly PullPoint[], rpm: number, hint?: { i: number }): { hp: number, lbFt: number } {
  let i: number
  if (hint) {
    while (hint.i < points.length - 2 && (points[hint.i + 1] as PullPoint).rpm < rpm) hint.i++
    i = hint.i
  }
  else {
    i = segmentIndex(points, rpm)
  }
  const a = points[i] as PullPoint
  const b = points[i + 1] as PullPoint
  const lbFt = lerp(a.rpm, torqueOf(a), b.rpm, torqueOf(b), rpm)
  return { lbFt, hp: (lbFt * rpm) / HP_TORQUE_CROSSOVER_RPM }
}

/** The multiples of stepRpm that lie inside [fromRpm, toRpm]; a RangeError past MAX_GRID_POINTS. */
export function rpmGrid(fromRpm: number, toRpm: number, stepRpm: number): number[] {
  finite('fromRpm', fromRpm)
  finite('toRpm', toRpm)
  positive('stepRpm', stepRpm)
  if (toRpm < fromRpm) throw new RangeError(`toRpm (${toRpm}) must not be below fromRpm (${fromRpm})`)
  // Refuse before counting: with a step this small the counting below would not end (k·step stays put).
  const estimate = (toRpm - fromRpm) / stepRpm
  if (!(estimate <= MAX_GRID_POINTS) || !Number.isFinite(fromRpm / stepRpm) || !Number.isFinite(toRpm / stepRpm)) {
    throw new RangeError(`stepRpm ${stepRpm} gives more than ${MAX_GRID_POINTS.toLocaleString('en-US')} grid points over ${fromRpm}–${toRpm} rpm: use a larger step`)
  }
  // Rounding in the division can land one step off either way; settle k·step inside the range exactly.
  let first = Math.ceil(fromRpm / stepRpm)
  while (first * stepRpm < fromRpm) first++
  while ((first - 1) * stepRpm >= fromRpm) first--
  let last = Math.floor(toRpm / stepRpm)
  while (last * stepRpm > toRpm) last--
  while ((last + 1) * stepRpm <= toRpm) last++
  const count = last - first + 1
  if (count > MAX_GRID_POINTS) {
    throw new RangeError(`stepRpm ${stepRpm} gives ${Math.round(count).toLocaleString('en-US')} grid points over ${fromRpm}–${toRpm} rpm; the most is ${MAX_GRID_POINTS.toLocaleString('en-US')}: use a larger step`)
  }
  const grid: number[] = []
  for (let k = first; k <= last; k++) grid.push(k * stepRpm)
  return grid
}

/**
 * Linear interpolation onto the multiples of stepRpm inside the data's rpm range (no extrapolation).
 * Torque is interpolated (measured, or hp × 5252.113 / rpm where a point gives none) and power is
 * recomputed from it, so hp and lb·ft agree at every resampled point.
 */
export function resample(points: readonly PullPoint[], stepRpm: number): PullPoint[] {
  assertCurve(points)
  const first = points[0] as PullPoint
  const last = points[points.length - 1] as PullPoint
  const grid = rpmGrid(first.rpm, last.rpm, stepRpm)
  const out: PullPoint[] = new Array(grid.length)
  const hint = { i: 0 }
  for (let g = 0; g < grid.length; g++) {
    const rpm = grid[g] as number
    const { hp, lbFt } = figuresAt(points, rpm, hint)
    out[g] = { rpm, hp, lbFt }
  }
  return out
}

export interface Peaks {
  peakHp: number
  peakHpRpm: number
  peakTq: number
  peakTqRpm: number
}

/** Peak power and peak torque with their rpm (the first, lowest rpm, on a tie); one point is enough. */
export function peaks(points: readonly PullPoint[]): Peaks {
  if (!Array.isArray(points) || points.length === 0) throw new RangeError('points: peaks needs at least one point')
  let peakHp = -Infinity
  let peakHpRpm = Number.NaN
  let peakTq = -Infinity
  let peakTqRpm = Number.NaN
  for (let i = 0; i < points.length; i++) {
    const p = assertPoint(points[i] as PullPoint, `points[${i}]`)
    if (p.hp > peakHp) {
      peakHp = p.hp
      peakHpRpm = p.rpm
    }
    const tq = torqueOf(p)
    if (tq > peakTq) {
      peakTq = tq
      peakTqRpm = p.rpm
    }
  }
  return { peakHp, peakHpRpm, peakTq, peakTqRpm }
}

/** Mean of a figure over [fromRpm, toRpm] clipped to the data, by the trapezoid rule. */
export function bandAverage(
  points: readonly PullPoint[],
  fromRpm: number,
  toRpm: number,
  value: (p: PullPoint) => number,
): number {
  assertCurve(points)
  callable('value', value)
  finite('fromRpm', fromRpm)
  finite('toRpm', toRpm)
  if (toRpm <= fromRpm) throw new RangeError(`the band must run upwards (got ${fromRpm}–${toRpm} rpm)`)
  const first = points[0] as PullPoint
  const last = points[points.length - 1] as PullPoint
  const lo = Math.max(fromRpm, first.rpm)
  const hi = Math.min(toRpm, last.rpm)
  if (hi <= lo) {
    throw new RangeError(`the band ${fromRpm}–${toRpm} rpm lies outside the pull, which runs ${first.rpm}–${last.rpm} rpm`)
  }
  let area = 0
  let x0 = lo
  let y0 = interpolate(points, lo, value)
  let i = segmentIndex(points, lo) + 1
  while (i < points.length && (points[i] as PullPoint).rpm < hi) {
    const p = points[i] as PullPoint
    const y = value(p)
    if (!Number.isFinite(y)) throw new RangeError(`value must give a finite figure at every point (got ${y} at ${p.rpm} rpm)`)
    area += ((y0 + y) / 2) * (p.rpm - x0)
    x0 = p.rpm
    y0 = y
    i++
  }
  const yHi = interpolate(points, hi, value)
  area += ((y0 + yHi) / 2) * (hi - x0)
  const mean = area / (hi - lo)
  if (!Number.isFinite(mean)) throw new RangeError('value must give a finite figure at every point')
  return mean
}

/** Average power in hp over an rpm band, trapezoid rule, clipped to the data; RangeError if the band misses the data. */
export function averagePower(points: readonly PullPoint[], fromRpm: number, toRpm: number): number {
  return bandAverage(points, fromRpm, toRpm, p => p.hp)
}

/** Average torque in lb·ft over an rpm band, as averagePower. */
export function averageTorque(points: readonly PullPoint[], fromRpm: number, toRpm: number): number {
  return bandAverage(points, fromRpm, toRpm, torqueOf)
}

export interface PowerBand {
  fromRpm: number
  toRpm: number
  widthRpm: number
  thresholdHp: number
  /** The band runs into the first or last point of the pull, so the engine's real band may be wider. */
  reachesStart: boolean
  reachesEnd: boolean
}

/**
 * The contiguous rpm span around peak power where hp ≥ fraction × peak hp, crossings interpolated.
 * A curve whose power never rises above zero has no band: a RangeError.
 */
export function powerBandRpm(points: readonly PullPoint[], fraction: number): PowerBand {
  assertCurve(points)
  aboveZeroUpTo('fraction', fraction, 1, '(of peak power)')
  let peakIndex = 0
  for (let i = 1; i < points.length; i++) {
    if ((points[i] as PullPoint).hp > (points[peakIndex] as PullPoint).hp) peakIndex = i
  }
  const peak = points[peakIndex] as PullPoint
  if (peak.hp <= 0) throw new RangeError(`points: a power band needs power above zero somewhere (peak is ${peak.hp} hp)`)
  const threshold = fraction * peak.hp
  let fromRpm = (points[0] as PullPoint).rpm
  let reachesStart = true
  for (let i = peakIndex; i > 0; i--) {
    const below = points[i - 1] as PullPoint
    if (below.hp < threshold) {
      const above = points[i] as PullPoint
      fromRpm = Math.min(above.rpm, Math.max(below.rpm, lerp(below.hp, below.rpm, above.hp, above.rpm, threshold)))
      reachesStart = false
      break
    }
  }
  let toRpm = (points[points.length - 1] as PullPoint).rpm
  let reachesEnd = true
  for (let i = peakIndex; i < points.length - 1; i++) {
    const after = points[i + 1] as PullPoint
    if (after.hp < threshold) {
      const above = points[i] as PullPoint
      toRpm = Math.min(after.rpm, Math.max(above.rpm, lerp(above.hp, above.rpm, after.hp, after.rpm, threshold)))
      reachesEnd = false
      break
    }
  }
  return { fromRpm, toRpm, widthRpm: toRpm - fromRpm, thresholdHp: threshold, reachesStart, reachesEnd }
}

export interface DeltaPoint {
  rpm: number
  baselineHp: number
  variantHp: number
  hpDelta: number
  tqDelta: number
}

export type DeltaKind = 'gain' | 'loss' | 'even'

export interface DeltaRegion {
  fromRpm: number
  toRpm: number
  kind: DeltaKind
  /** The largest change inside the region, signed (hp). */
  extremeHp: number
  extremeRpm: number
  averageDeltaHp: number
}

export interface DeltaSummary {
  fromRpm: number
  toRpm: number
  stepRpm: number
  /** Changes within ±evenHp count as even. */
  evenHp: number
  /** Largest gain (hp, ≥ 0) and its rpm; null rpm when the variant gained nowhere. */
  maxGainHp: number
  maxGainRpm: number | null
  /** Largest loss as a positive number of hp, and its rpm; null rpm when the variant lost nowhere. */
  maxLossHp: number
  maxLossRpm: number | null
  averageDeltaHp: number
  averageDeltaTq: number
  /** Total rpm width where the variant gained, and where it lost. */
  gainWidthRpm: number
  lossWidthRpm: number
  regions: DeltaRegion[]
}

export interface DeltaCurve {
  points: DeltaPoint[]
  summary: DeltaSummary
}

export interface DeltaOptions {
  /** Grid step (default 100 rpm). */
  stepRpm?: number
  /** Band counted as even (default 1 % of the baseline's peak power, about one pull's repeatability: common practice). */
  evenHp?: number
}

/** Trapezoid mean of y over x for an evenly or unevenly spaced series. */
function seriesMean(xs: readonly number[], ys: readonly number[]): number {
  if (xs.length < 2) return ys[0] ?? 0
  let area = 0
  for (let i = 1; i < xs.length; i++) {
    area += (((ys[i - 1] as number) + (ys[i] as number)) / 2) * ((xs[i] as number) - (xs[i - 1] as number))
  }
  return area / ((xs[xs.length - 1] as number) - (xs[0] as number))
}

/** Variant minus baseline on a common rpm grid, with where and by how much the variant gained or lost. */
export function deltaCurve(baseline: readonly PullPoint[], variant: readonly PullPoint[], options: DeltaOptions = {}): DeltaCurve {
  assertCurve(baseline, 'baseline')
  assertCurve(variant, 'variant')
  if (options === null || typeof options !== 'object') throw new RangeError('options must be an object ({ stepRpm?, evenHp? })')
  const stepRpm = positive('stepRpm', options.stepRpm ?? 100)
  const lo = Math.max((baseline[0] as PullPoint).rpm, (variant[0] as PullPoint).rpm)
  const hi = Math.min((baseline[baseline.length - 1] as PullPoint).rpm, (variant[variant.length - 1] as PullPoint).rpm)
  if (hi <= lo) throw new RangeError('the two pulls share no rpm range')
  const grid = rpmGrid(lo, hi, stepRpm)
  if (grid.length < 2) throw new RangeError(`the shared range ${lo}–${hi} rpm is too short for a ${stepRpm} rpm grid`)
  const evenHp = options.evenHp === undefined
    ? 0.01 * Math.abs(peaks(baseline).peakHp)
    : nonNegative('evenHp', options.evenHp)

  // Torque interpolated and power recomputed from it on both curves, so hp and lb·ft deltas agree.
  const points: DeltaPoint[] = grid.map((rpm) => {
    const base = figuresAt(baseline, rpm)
    const vary = figuresAt(variant, rpm)
    return { rpm, baselineHp: base.hp, variantHp: vary.hp, hpDelta: vary.hp - base.hp, tqDelta: vary.lbFt - base.lbFt }
  })

  const kindOf = (d: number): DeltaKind => (d > evenHp ? 'gain' : d < -evenHp ? 'loss' : 'even')
  const regions: DeltaRegion[] = []
  let start = 0
  for (let i = 1; i <= points.length; i++) {
    const current = points[i]
    const first = points[start] as DeltaPoint
    if (current && kindOf(current.hpDelta) === kindOf(first.hpDelta)) continue
    const run = points.slice(start, i)
    const prev = points[start - 1]
    const fromRpm = prev ? (prev.rpm + first.rpm) / 2 : first.rpm
    const lastOfRun = run[run.length - 1] as DeltaPoint
    const toRpm = current ? (lastOfRun.rpm + current.rpm) / 2 : lastOfRun.rpm
    let extreme = first
    for (const p of run) if (Math.abs(p.hpDelta) > Math.abs(extreme.hpDelta)) extreme = p
    const averageDeltaHp = run.length > 1
      ? seriesMean(run.map(p => p.rpm), run.map(p => p.hpDelta))
      : first.hpDelta
    regions.push({ fromRpm, toRpm, kind: kindOf(first.hpDelta), extremeHp: extreme.hpDelta, extremeRpm: extreme.rpm, averageDeltaHp })
    start = i
  }

  let maxGainHp = 0
  let maxGainRpm: number | null = null
  let maxLossHp = 0
  let maxLossRpm: number | null = null
  for (const p of points) {
    if (p.hpDelta > evenHp && p.hpDelta > maxGainHp) {
      maxGainHp = p.hpDelta
      maxGainRpm = p.rpm
    }
    if (p.hpDelta < -evenHp && -p.hpDelta > maxLossHp) {
      maxLossHp = -p.hpDelta
      maxLossRpm = p.rpm
    }
  }
  const width = (kind: DeltaKind): number =>
    regions.filter(r => r.kind === kind).reduce((sum, r) => sum + (r.toRpm - r.fromRpm), 0)
  const xs = points.map(p => p.rpm)
  const summary: DeltaSummary = {
    fromRpm: grid[0] as number,
    toRpm: grid[grid.length - 1] as number,
    stepRpm,
    evenHp,
    maxGainHp,
    maxGainRpm,
    maxLossHp,
    maxLossRpm,
    averageDeltaHp: seriesMean(xs, points.map(p => p.hpDelta)),
    averageDeltaTq: seriesMean(xs, points.map(p => p.tqDelta)),
    gainWidthRpm: width('gain'),
    lossWidthRpm: width('loss'),
    regions,
  }
  return { points, summary }
}

/** 6400 → "6,400": rpm rounded to the nearest 10. */
function formatRpm(rpm: number): string {
  const rounded = Math.round(rpm / 10) * 10
  return String(rounded).replace(/\B(?=(\d{3})+(?!\d))/g, ',')
}

const formatHp = (hp: number): string => Math.abs(hp).toFixed(1)

/** The region of a kind that moved the most power (largest |average change| × width). */
function largest(regions: DeltaRegion[], kind: DeltaKind): DeltaRegion | undefined {
  let best: DeltaRegion | undefined
  let bestWeight = -1
  for (const r of regions) {
    if (r.kind !== kind) continue
    const weight = Math.abs(r.averageDeltaHp) * (r.toRpm - r.fromRpm)
    if (weight > bestWeight) {
      best = r
      bestWeight = weight
    }
  }
  return best
}

function stretch(summary: DeltaSummary, kind: 'gain' | 'loss', verb: string): string | null {
  const regions = summary.regions.filter(r => r.kind === kind)
  const main = largest(summary.regions, kind)
  if (!main) return null
  const amount = kind === 'gain' ? summary.maxGainHp : summary.maxLossHp
  const at = kind === 'gain' ? summary.maxGainRpm : summary.maxLossRpm
  const where = regions.length === 1
    ? `from ${formatRpm(main.fromRpm)} to ${formatRpm(main.toRpm)} rpm`
    : `in ${regions.length} stretches, the longest from ${formatRpm(main.fromRpm)} to ${formatRpm(main.toRpm)} rpm`
  return `${verb} ${where} (up to ${formatHp(amount)} hp, at ${formatRpm(at ?? main.extremeRpm)} rpm)`
}

/** One or two plain sentences saying where the variant gained and lost, and by how much. */
export function describeDelta(summary: DeltaSummary): string {
  record('summary', summary, 'the fields of a deltaCurve summary')
  for (const key of ['fromRpm', 'toRpm', 'evenHp', 'maxGainHp', 'maxLossHp', 'averageDeltaHp'] as const) finite(`summary.${key}`, summary[key])
  if (!Array.isArray(summary.regions)) throw new RangeError('summary.regions must be an array of delta regions')
  summary.regions.forEach((r, i) => {
    record(`summary.regions[${i}]`, r, 'fromRpm, toRpm, kind and averageDeltaHp')
    finite(`summary.regions[${i}].fromRpm`, r.fromRpm)
    finite(`summary.regions[${i}].toRpm`, r.toRpm)
    finite(`summary.regions[${i}].averageDeltaHp`, r.averageDeltaHp)
  })
  const span = `${formatRpm(summary.fromRpm)}–${formatRpm(summary.toRpm)} rpm`
  const gained = stretch(summary, 'gain', 'gained')
  const lost = stretch(summary, 'loss', 'lost')
  const avg = summary.averageDeltaHp
  const average = Math.abs(avg) < 0.05
    ? `Over the shared ${span} the two average the same power.`
    : `Over the shared ${span} the variant averages ${formatHp(avg)} hp ${avg > 0 ? 'more' : 'less'}.`
  if (!gained && !lost) {
    return `The variant matches the baseline within ${formatHp(summary.evenHp)} hp everywhere from ${span}. ${average}`
  }
  const hasEven = summary.regions.some(r => r.kind === 'even')
  const rest = hasEven ? `; elsewhere it stays within ${formatHp(summary.evenHp)} hp of the baseline` : ''
  const first = gained && lost ? `The variant ${gained}, and ${lost}.` : `The variant ${gained ?? lost}${rest}.`
  return `${first} ${average}`
}
