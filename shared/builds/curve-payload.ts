import type { BuildCurves, CurveComparison, CurvePull } from '../types/builds'

/**
 * A build's curves as the build page carries them from the server render to the browser: each curve as
 * columns of numbers (rpm, power, torque) rather than one object per point, which the payload would
 * spell out point by point. `unpackCurves` gives the page back the shape its components take.
 */
export interface PackedCurves extends Omit<BuildCurves, 'pulls' | 'comparisons'> {
  pulls: (Omit<CurvePull, 'points'> & { rpm: number[], hp: number[], lbFt: number[] })[]
  comparisons: (Omit<CurveComparison, 'points'> & { rpm: number[], hpDelta: number[], tqDelta: number[] })[]
}

export function packCurves(curves: BuildCurves): PackedCurves {
  return {
    ...curves,
    pulls: curves.pulls.map(({ points, ...pull }) => ({ ...pull, rpm: points.map(p => p.rpm), hp: points.map(p => p.hp), lbFt: points.map(p => p.lbFt) })),
    comparisons: curves.comparisons.map(({ points, ...c }) => ({ ...c, rpm: points.map(p => p.rpm), hpDelta: points.map(p => p.hpDelta), tqDelta: points.map(p => p.tqDelta) })),
  }
}

export function unpackCurves(packed: PackedCurves): BuildCurves {
  return {
    ...packed,
    pulls: packed.pulls.map(({ rpm, hp, lbFt, ...pull }) => ({ ...pull, points: rpm.map((r, i) => ({ rpm: r, hp: hp[i]!, lbFt: lbFt[i]! })) })),
    comparisons: packed.comparisons.map(({ rpm, hpDelta, tqDelta, ...c }) => ({ ...c, points: rpm.map((r, i) => ({ rpm: r, hpDelta: hpDelta[i]!, tqDelta: tqDelta[i]! })) })),
  }
}
