/**
 * Whether a delivery pull releases a guaranteed milestone: the pull must pass the automatic
 * evidence checks (no check fails, and the correction lies inside the standard's band), the engine
 * must be inside the request's displacement cap, and
 * its peak power under the quoted standard must reach the guaranteed figure less the tolerance.
 */
import { convertCurve, isCorrectionStandard } from '../engine/correction'
import { peaks, torqueAt } from '../engine/curves'
import { checkEvidence } from '../engine/evidence'
import { displacementCi } from '../engine/geometry'
import type { Aspiration, CorrectionStandard, EvidenceCheck, ParseColumns, PullPoint, Weather } from '../engine/types'
import { displayCurve } from '../builds/display-curve'

export interface Guarantee {
  hp: number
  tolerancePct: number
  standard: string
}

export interface DeliveryInput {
  points: PullPoint[]
  columns?: Pick<ParseColumns, 'torque' | 'power'> | null
  declaredStandard: CorrectionStandard
  weather: Weather
  boreIn: number
  strokeIn: number
  cylinders: number
  aspiration: Aspiration
  displacementCapCi: number | null
  guarantee: Guarantee | null
  fingerprintsOfOtherBuilds?: { buildId: string | number, fingerprint: string }[]
}

export interface DeliveryEvaluation {
  standard: string
  peakHp: number
  peakHpRpm: number
  peakTq: number
  peakTqRpm: number
  uncorrected: boolean
  displacementCi: number
  targetHp: number | null
  minimumHp: number | null
  checks: Pick<EvidenceCheck, 'id' | 'outcome' | 'message'>[]
  /** The curve under the quoted standard, on at most DISPLAY_MAX_POINTS points, for the order page's chart. */
  curve: { rpm: number, hp: number, lbFt: number }[]
  /** Why the pull is not verified, in words the shop can act on; empty when it is. */
  reasons: string[]
  status: 'verified' | 'rejected'
  meetsTarget: boolean
}

const one = (n: number) => Math.round(n * 10) / 10

/** The least peak power that meets a guarantee: the target less its tolerance. */
export function minimumPower(g: Guarantee): number {
  return g.hp * (1 - g.tolerancePct / 100)
}

export function evaluateDelivery(input: DeliveryInput): DeliveryEvaluation {
  const displacement = displacementCi(input.boreIn, input.strokeIn, input.cylinders)
  const checks = checkEvidence(
    { points: input.points, declared: { standard: input.declaredStandard }, weather: input.weather, columns: input.columns ?? null },
    { aspiration: input.aspiration, displacementCi: displacement, strokeIn: input.strokeIn, fingerprintsOfOtherBuilds: input.fingerprintsOfOtherBuilds ?? [] },
  )
  // Money moves on this pull, so a correction outside the standard's allowed band (a warning on a
  // build) is refused here too: the figure under the quoted standard depends on it.
  const reasons = checks.filter(c => c.outcome === 'fail' || (c.id === 'correction-factor' && c.outcome === 'warn')).map(c => c.message)
  if (input.displacementCapCi !== null && displacement > input.displacementCapCi + 1e-9) {
    reasons.push(`The engine displaces ${displacement.toFixed(1)} ci, over the ${input.displacementCapCi} ci cap of the request.`)
  }
  const target: CorrectionStandard = input.guarantee && isCorrectionStandard(input.guarantee.standard) ? input.guarantee.standard : input.declaredStandard
  let peak = { peakHp: 0, peakHpRpm: 0, peakTq: 0, peakTqRpm: 0 }
  let uncorrected = true
  let curve: DeliveryEvaluation['curve'] = []
  try {
    const converted = convertCurve(input.points, { standard: input.declaredStandard, weather: input.weather }, { standard: target, weather: input.weather })
    peak = peaks(converted.points)
    uncorrected = converted.uncorrected
    curve = displayCurve(converted.points).map(p => ({ rpm: p.rpm, hp: one(p.hp), lbFt: one(torqueAt(p)) }))
  }
  catch (error) {
    reasons.push(`The curve could not be put under ${target}: ${error instanceof Error ? error.message : String(error)}.`)
  }
  const minimum = input.guarantee ? minimumPower(input.guarantee) : null
  const status = reasons.length === 0 ? 'verified' : 'rejected'
  return {
    standard: target,
    peakHp: one(peak.peakHp),
    peakHpRpm: peak.peakHpRpm,
    peakTq: one(peak.peakTq),
    peakTqRpm: peak.peakTqRpm,
    uncorrected,
    displacementCi: one(displacement),
    targetHp: input.guarantee?.hp ?? null,
    minimumHp: minimum === null ? null : one(minimum),
    checks: checks.map(c => ({ id: c.id, outcome: c.outcome, message: c.message })),
    curve,
    reasons,
    status,
    meetsTarget: status === 'verified' && (minimum === null || peak.peakHp >= minimum),
  }
}
