import { checkEvidence } from '../engine/evidence'
import { curveFingerprint } from '../engine/fingerprint'
import { displacementCi } from '../engine/geometry'
import { parsePull } from '../engine/parse'
import type { Aspiration, DeclaredFigures, EvidenceCheck, ParseError, PullPoint, Weather } from '../engine/types'
import { derivePullFigures, type DerivedPullFigures } from './figures'
import { summarisePull, type PullSummaryFigures } from './summary'

export interface PullBuildContext {
  id: number | null
  aspiration: Aspiration
  boreIn: number
  strokeIn: number
  cylinders: number
}

export type PullEvaluation
  = | { ok: false, errors: ParseError[] }
    | { ok: true, points: PullPoint[], warnings: string[], checks: EvidenceCheck[], summary: PullSummaryFigures, fingerprint: string, figures: DerivedPullFigures }

/**
 * Everything Torquewright learns from one pull file before it is saved: the parse (errors by row),
 * the automatic evidence report, the headline figures under the build standard, the curve's fingerprint
 * and the derived figures under every standard (shared/pulls/figures.ts) that are stored with the pull.
 * The same path serves uploads, the parse preview and the demo seed.
 */
export function evaluatePull(input: {
  text: string
  declared: DeclaredFigures
  weather: Weather | null
  build: PullBuildContext
  fingerprintsOfOtherBuilds?: { buildId: number, fingerprint: string }[]
}): PullEvaluation {
  const parsed = parsePull(input.text)
  if (!parsed.ok) return { ok: false, errors: parsed.errors }
  const { build } = input
  const checks = checkEvidence(
    { points: parsed.points, declared: input.declared, weather: input.weather, columns: parsed.columns },
    {
      aspiration: build.aspiration,
      displacementCi: displacementCi(build.boreIn, build.strokeIn, build.cylinders),
      strokeIn: build.strokeIn,
      buildId: build.id,
      fingerprintsOfOtherBuilds: input.fingerprintsOfOtherBuilds?.filter(f => f.buildId !== build.id),
    },
  )
  return {
    ok: true,
    points: parsed.points,
    warnings: parsed.warnings,
    checks,
    summary: summarisePull(parsed.points, input.declared.standard, input.weather),
    fingerprint: curveFingerprint(parsed.points),
    figures: derivePullFigures(parsed.points, input.declared.standard, input.weather),
  }
}
