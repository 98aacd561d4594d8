import { camEvents, type CamEvents } from '../engine/cam'
import { displacementCi, dynamicCompressionRatio, rodStrokeRatio, staticCompressionRatio } from '../engine/geometry'
import { bmepKpaFromImperial, bmepPsi } from '../engine/power'

/** The typed combination fields the computed figures read; any may still be empty. */
export interface FigureInputs {
  cylinders: number | null
  boreIn: number | null
  strokeIn: number | null
  rodLengthIn: number | null
  chamberCc: number | null
  pistonCc: number | null
  gasketBoreIn: number | null
  gasketThicknessIn: number | null
  deckClearanceIn: number | null
  camIntakeDurationDeg: number | null
  camExhaustDurationDeg: number | null
  camLobeSeparationDeg: number | null
  camIntakeCenterlineDeg: number | null
}

/** Each figure the editor shows as the shop types, null until the fields it needs are there and sound. */
export interface CombinationFigures {
  displacementCi: number | null
  rodStroke: number | null
  staticCompression: number | null
  dynamicCompression: number | null
  cam: CamEvents | null
  bmepPsi: number | null
  bmepKpa: number | null
}

const known = (...values: (number | null | undefined)[]) => values.every(v => typeof v === 'number' && Number.isFinite(v))

/** Runs one engine-module formula, answering null when its inputs are out of its domain. */
function attempt<T>(run: () => T): T | null {
  try {
    return run()
  }
  catch {
    return null
  }
}

/**
 * The combination's computed figures from shared/engine (displacement, rod/stroke, static and
 * dynamic compression, cam events) and, once a pull gives peak torque, BMEP at that peak.
 */
export function combinationFigures(f: FigureInputs, peakTorqueLbFt: number | null = null): CombinationFigures {
  const { cylinders, boreIn, strokeIn, rodLengthIn } = f
  const ci = known(boreIn, strokeIn, cylinders) ? attempt(() => displacementCi(boreIn!, strokeIn!, cylinders!)) : null
  const rodStroke = known(rodLengthIn, strokeIn) ? attempt(() => rodStrokeRatio(rodLengthIn!, strokeIn!)) : null
  const compressionInput = known(boreIn, strokeIn, f.chamberCc, f.pistonCc, f.gasketBoreIn, f.gasketThicknessIn, f.deckClearanceIn)
    ? { boreIn: boreIn!, strokeIn: strokeIn!, chamberCc: f.chamberCc!, pistonCc: f.pistonCc!, gasketBoreIn: f.gasketBoreIn!, gasketThicknessIn: f.gasketThicknessIn!, deckClearanceIn: f.deckClearanceIn! }
    : null
  const staticCompression = compressionInput ? attempt(() => staticCompressionRatio(compressionInput)) : null
  const cam = known(f.camIntakeDurationDeg, f.camExhaustDurationDeg, f.camLobeSeparationDeg, f.camIntakeCenterlineDeg)
    ? attempt(() => camEvents({ intakeDurationDeg: f.camIntakeDurationDeg!, exhaustDurationDeg: f.camExhaustDurationDeg!, lobeSeparationDeg: f.camLobeSeparationDeg!, intakeCenterlineDeg: f.camIntakeCenterlineDeg! }))
    : null
  const dynamicCompression = compressionInput && cam && known(rodLengthIn)
    // A build's cam durations are at 0.050 in lift, so the closing is moved to seat timing (common-practice offset).
    ? attempt(() => dynamicCompressionRatio({ ...compressionInput, rodLengthIn: rodLengthIn!, intakeClosesAbdcDeg: cam.intakeClosesAbdcDeg, timingBasis: 'lift050' }))
    : null
  const bmep = ci && known(peakTorqueLbFt) ? { psi: attempt(() => bmepPsi(peakTorqueLbFt!, ci)), kpa: attempt(() => bmepKpaFromImperial(peakTorqueLbFt!, ci)) } : null
  return { displacementCi: ci, rodStroke, staticCompression, dynamicCompression, cam, bmepPsi: bmep?.psi ?? null, bmepKpa: bmep?.kpa ?? null }
}
