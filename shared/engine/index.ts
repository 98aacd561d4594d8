/**
 * Torquewright's engine math: pure functions with no I/O and only relative imports, so the same
 * code runs on the server, in the browser and under plain Node. Import from here.
 */
export * from './types'
export * from './units'
export {
  sweptVolumeCi, displacementCi, ciToLitres, litresToCi, clearanceVolumeCc, staticCompressionRatio,
  pistonTravelIn, effectiveStrokeIn, dynamicCompressionRatio, seatIntakeClosingAbdcDeg, SEAT_CLOSING_OFFSET_DEG, VALVE_TIMING_BASES, meanPistonSpeedFtMin, rodStrokeRatio, boreStrokeRatio,
} from './geometry'
export type { CompressionInput, DynamicCompressionInput, ValveTimingBasis } from './geometry'
export { MAX_MAGNITUDE } from './guard'
export { RPM_CEILING, FIGURE_CEILING, MAX_GRID_POINTS, PULL_MAX_ROWS, PULL_MAX_PREAMBLE_ROWS } from './limits'
export { camEvents } from './cam'
export type { CamSpec, CamEvents } from './cam'
export {
  HP_TORQUE_CROSSOVER_RPM, hpFromTorque, torqueFromHp, kwFromNm, nmFromKw, bmepPsi, bmepKpa, bmepKpaFromImperial,
  hpPerCi, hpPerLitre, kwPerLitreFromHp,
} from './power'
export {
  SATURATION_FORMULA, saturationPressureKpa, validateWeather, airState, isCorrectionStandard, correctionFactor,
  STANDARD_LIMITS, PUBLISHED_TEMP_BAND_C, correctionValidity, specFactor, convertCurve,
} from './correction'
export type { AirState, StandardLimits, CorrectionValidity, ConvertedCurve } from './correction'
export {
  assertCurve, assertPoint, torqueAt, valueAt, hpAt, rpmGrid, resample, peaks, bandAverage, averagePower, averageTorque,
  powerBandRpm, deltaCurve, describeDelta,
} from './curves'
export type { Peaks, PowerBand, DeltaPoint, DeltaKind, DeltaRegion, DeltaSummary, DeltaCurve, DeltaOptions } from './curves'
export { GASOLINE_BSFC, GASOLINE_STOICH_AFR, fuelDefaults, fuelFlowLbHr, injectorSizeLbHr, lbHrToCcMin, ccMinToLbHr, airflowCfm } from './fuel'
export type { FuelDefaults, InjectorInput } from './fuel'
export { PARSE_LIMITS, classifyHeader, parseNumberCell, parsePull, columnUnitLabel } from './parse'
export { BMEP_BOUNDS_KPA, PISTON_SPEED_BOUNDS_FT_MIN, evidenceOutcome, checkEvidence } from './evidence'
export {
  FINGERPRINT_GRID_RPM, FINGERPRINT_WINDOW_RPM, FINGERPRINT_TOLERANCE, curveFingerprint, fingerprintDistance, sameCurve,
} from './fingerprint'
