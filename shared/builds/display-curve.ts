import { resample } from '../engine/curves'
import type { PullPoint } from '../engine/types'

/** The most points a pull's curve carries to a page; a denser pull is resampled for display. */
export const DISPLAY_MAX_POINTS = 400

/** Display steps are whole multiples of this many rpm, so the grid reads as round numbers. */
const STEP_UNIT_RPM = 10

/**
 * The rpm step that puts a pull spanning `spanRpm` on at most DISPLAY_MAX_POINTS points:
 * the smallest multiple of 10 rpm that fits.
 */
export function displayStepRpm(spanRpm: number): number {
  const raw = spanRpm / (DISPLAY_MAX_POINTS - 1)
  return Math.max(STEP_UNIT_RPM, Math.ceil(raw / STEP_UNIT_RPM) * STEP_UNIT_RPM)
}

/**
 * The curve a page draws: the pull itself when it is small enough, otherwise the same curve resampled
 * on a round rpm grid inside its own span (no extrapolation). Peaks and band figures are computed
 * from the full curve, never from this one; the raw file stays available for download and review.
 */
export function displayCurve(points: readonly PullPoint[]): PullPoint[] {
  if (points.length <= DISPLAY_MAX_POINTS) return points.slice()
  const first = points[0] as PullPoint
  const last = points[points.length - 1] as PullPoint
  return resample(points, displayStepRpm(last.rpm - first.rpm))
}
