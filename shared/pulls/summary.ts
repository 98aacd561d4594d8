import { convertCurve } from '../engine/correction'
import { peaks } from '../engine/curves'
import type { CorrectionStandard, PullPoint, Weather } from '../engine/types'

/** The standard every build's headline figures are normalised to. */
export const BUILD_STANDARD: CorrectionStandard = 'SAE_J1349_2004'

export interface PullSummaryFigures {
  points: number
  rpmFrom: number
  rpmTo: number
  peakHp: number
  peakHpRpm: number
  peakTq: number
  peakTqRpm: number
  /** True when the weather was unknown, so the figures are as observed. */
  uncorrected: boolean
}

const one = (n: number) => Math.round(n * 10) / 10

/** Headline figures of a pull under the build standard, recomputed from the raw points and the shop's weather. */
export function summarisePull(points: PullPoint[], declared: CorrectionStandard, weather: Weather | null): PullSummaryFigures {
  const converted = convertCurve(points, { standard: declared, weather }, { standard: BUILD_STANDARD, weather })
  const pk = peaks(converted.points)
  const first = points[0]
  const last = points[points.length - 1]
  return {
    points: points.length,
    rpmFrom: first?.rpm ?? 0,
    rpmTo: last?.rpm ?? 0,
    peakHp: one(pk.peakHp),
    peakHpRpm: pk.peakHpRpm,
    peakTq: one(pk.peakTq),
    peakTqRpm: pk.peakTqRpm,
    uncorrected: converted.uncorrected,
  }
}
