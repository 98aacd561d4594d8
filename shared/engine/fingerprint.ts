/**
 * A fingerprint of a curve's shape that survives resampling, a different rpm step and a change
 * of correction standard, so the same pull attached to two builds can be found.
 *
 * Method (our own): average hp over 500 rpm windows centred on every multiple of 250 rpm that
 * the pull covers fully (the window average barely moves when the same curve is resampled),
 * divide by the largest average, and store each as 12 bits. A correction change multiplies every
 * figure by one constant, so the distance between two fingerprints is the spread (RMS) of the
 * log-ratios of their common values, which a constant ratio leaves at zero.
 */
import { assertCurve } from './curves'
import { nonNegative } from './guard'
import { RPM_CEILING } from './limits'
import type { PullPoint } from './types'

export const FINGERPRINT_GRID_RPM = 250
export const FINGERPRINT_WINDOW_RPM = 500
/** Distance at or under which two fingerprints are taken as the same curve (a 0.3 % shape spread; our own choice). */
export const FINGERPRINT_TOLERANCE = 0.003

/** Most windows a fingerprint holds: the whole rpm ceiling on the 250 rpm grid. */
const MAX_WINDOWS = Math.ceil(RPM_CEILING / FINGERPRINT_GRID_RPM) + 1
const VERSION = 'f1'
const LEVELS = 4095
/** Values under 5 % of the curve's largest are left out of distances (their ratios are all noise). */
const FLOOR = Math.round(0.05 * LEVELS)
const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_'

/** Running trapezoid integral of hp over rpm at each point. */
function cumulative(points: readonly PullPoint[]): Float64Array {
  const out = new Float64Array(points.length)
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1] as PullPoint
    const b = points[i] as PullPoint
    out[i] = (out[i - 1] as number) + ((a.hp + b.hp) / 2) * (b.rpm - a.rpm)
  }
  return out
}

/** The integral of hp from the first point up to rpm, given a starting segment index hint. */
function integralAt(points: readonly PullPoint[], area: Float64Array, rpm: number, hint: { i: number }): number {
  while (hint.i < points.length - 2 && (points[hint.i + 1] as PullPoint).rpm <= rpm) hint.i++
  const a = points[hint.i] as PullPoint
  const b = points[hint.i + 1] as PullPoint
  const y = a.hp + ((b.hp - a.hp) * (rpm - a.rpm)) / (b.rpm - a.rpm)
  return (area[hint.i] as number) + ((a.hp + y) / 2) * (rpm - a.rpm)
}

/** The short string that identifies a curve's shape. */
export function curveFingerprint(points: readonly PullPoint[]): string {
  assertCurve(points)
  const first = (points[0] as PullPoint).rpm
  const last = (points[points.length - 1] as PullPoint).rpm
  const half = FINGERPRINT_WINDOW_RPM / 2
  const startIndex = Math.ceil((first + half) / FINGERPRINT_GRID_RPM)
  const endIndex = Math.floor((last - half) / FINGERPRINT_GRID_RPM)
  // assertCurve keeps rpm under RPM_CEILING, so this is at most 100 windows; the check keeps it so.
  if (endIndex - startIndex + 1 > MAX_WINDOWS) throw new RangeError(`points span too wide an rpm range to fingerprint (${first}–${last} rpm)`)
  const area = cumulative(points)
  const lowHint = { i: 0 }
  const highHint = { i: 0 }
  const averages: number[] = []
  for (let k = startIndex; k <= endIndex; k++) {
    const centre = k * FINGERPRINT_GRID_RPM
    const lo = integralAt(points, area, centre - half, lowHint)
    const hi = integralAt(points, area, centre + half, highHint)
    averages.push((hi - lo) / FINGERPRINT_WINDOW_RPM)
  }
  let top = 0
  for (const value of averages) if (value > top) top = value
  let payload = ''
  for (const value of averages) {
    const q = top > 0 ? Math.min(LEVELS, Math.max(0, Math.round((value / top) * LEVELS))) : 0
    payload += (ALPHABET[q >> 6] as string) + (ALPHABET[q & 63] as string)
  }
  return `${VERSION}.${Math.max(0, startIndex).toString(36)}.${payload}`
}

interface Decoded {
  start: number
  values: number[]
}

function decodeFingerprint(fingerprint: string): Decoded | null {
  if (typeof fingerprint !== 'string') return null
  const parts = fingerprint.split('.')
  if (parts.length !== 3 || parts[0] !== VERSION) return null
  const start = Number.parseInt(parts[1] as string, 36)
  const payload = parts[2] as string
  if (!Number.isFinite(start) || payload.length % 2 !== 0 || payload.length > 2 * MAX_WINDOWS) return null
  const values: number[] = []
  for (let i = 0; i < payload.length; i += 2) {
    const hi = ALPHABET.indexOf(payload[i] as string)
    const lo = ALPHABET.indexOf(payload[i + 1] as string)
    if (hi < 0 || lo < 0) return null
    values.push(hi * 64 + lo)
  }
  return { start, values }
}

/**
 * How far apart two curve shapes are: the RMS spread of the log-ratios of their common values
 * (0 for the same shape at any scale). Infinity when they share too little rpm range to compare
 * (fewer than 4 values, or under half of the shorter curve) or a fingerprint is malformed.
 */
export function fingerprintDistance(a: string, b: string): number {
  const da = decodeFingerprint(a)
  const db = decodeFingerprint(b)
  if (!da || !db) return Number.POSITIVE_INFINITY
  const from = Math.max(da.start, db.start)
  const to = Math.min(da.start + da.values.length, db.start + db.values.length)
  const logs: number[] = []
  for (let k = from; k < to; k++) {
    const va = da.values[k - da.start] as number
    const vb = db.values[k - db.start] as number
    if (va >= FLOOR && vb >= FLOOR) logs.push(Math.log(va / vb))
  }
  const shorter = Math.min(da.values.length, db.values.length)
  if (logs.length < 4 || logs.length < shorter / 2) return Number.POSITIVE_INFINITY
  const mean = logs.reduce((s, x) => s + x, 0) / logs.length
  const variance = logs.reduce((s, x) => s + (x - mean) * (x - mean), 0) / logs.length
  return Math.sqrt(variance)
}

/** True when two fingerprints are the same curve within the tolerance. */
export function sameCurve(a: string, b: string, tolerance: number = FINGERPRINT_TOLERANCE): boolean {
  nonNegative('tolerance', tolerance)
  return fingerprintDistance(a, b) <= tolerance
}
