/** Cylinder geometry: displacement, compression, piston speed and rod ratio. */
import { finite, nonNegative, positive, positiveInteger, record, show, within } from './guard'
import { CC_PER_CI } from './units'

/** Area of a circle of the given diameter, π d² / 4. */
const circleArea = (diameter: number): number => (Math.PI / 4) * diameter * diameter

/** Swept volume of one cylinder in in³: π/4 × bore² × stroke. */
export function sweptVolumeCi(boreIn: number, strokeIn: number): number {
  positive('boreIn', boreIn)
  positive('strokeIn', strokeIn)
  return circleArea(boreIn) * strokeIn
}

/** Engine displacement in in³: π/4 × bore² × stroke × cylinders (handbook relation). */
export function displacementCi(boreIn: number, strokeIn: number, cylinders: number): number {
  positiveInteger('cylinders', cylinders)
  return sweptVolumeCi(boreIn, strokeIn) * cylinders
}

/** in³ to litres: 1 in³ = 16.387064 cm³ exactly. */
export function ciToLitres(ci: number): number {
  return (nonNegative('ci', ci) * CC_PER_CI) / 1000
}

/** Litres to in³. */
export function litresToCi(litres: number): number {
  return (nonNegative('litres', litres) * 1000) / CC_PER_CI
}

/** The head, piston, gasket and deck dimensions that set compression. */
export interface CompressionInput {
  boreIn: number
  strokeIn: number
  /** Combustion chamber volume in the head, cm³. */
  chamberCc: number
  /** Piston top volume, cm³: positive for a dish and valve reliefs, negative for a dome. */
  pistonCc: number
  gasketBoreIn: number
  /** Compressed thickness of the head gasket, in. */
  gasketThicknessIn: number
  /** Piston below the deck at TDC is positive; a piston out of the hole is negative. */
  deckClearanceIn: number
}

/**
 * Which lift the cam card's intake closing is quoted at: 'lift050' at 0.050 in tappet lift (the
 * usual card figure), 'seat' at the seat or advertised duration (the valve really closed).
 */
export type ValveTimingBasis = 'lift050' | 'seat'

export const VALVE_TIMING_BASES: readonly { id: ValveTimingBasis, label: string }[] = [
  { id: 'lift050', label: 'At 0.050 in lift' },
  { id: 'seat', label: 'Seat (advertised)' },
]

/**
 * Degrees the intake valve closes later at the seat than at 0.050 in lift, for converting a
 * 0.050 in figure: about 15° on a typical hydraulic or solid flat-tappet or roller lobe (common
 * practice; the real figure depends on the lobe, so the seat figure from the cam card is better).
 */
export const SEAT_CLOSING_OFFSET_DEG = 15

export interface DynamicCompressionInput extends CompressionInput {
  rodLengthIn: number
  /** Intake valve closing, degrees after BDC, on the timing basis below. */
  intakeClosesAbdcDeg: number
  /**
   * The basis of intakeClosesAbdcDeg. The usual dynamic-compression targets of the trade count
   * from the seat closing, so a 0.050 in figure is moved SEAT_CLOSING_OFFSET_DEG later first.
   * Left out, the figure is taken as the real (seat) closing and used as given.
   */
  timingBasis?: ValveTimingBasis
}

/** Intake closing at the seat, ° ABDC, from a closing on either basis (0.050 in + SEAT_CLOSING_OFFSET_DEG, common practice). */
export function seatIntakeClosingAbdcDeg(intakeClosesAbdcDeg: number, timingBasis: ValveTimingBasis): number {
  finite('intakeClosesAbdcDeg', intakeClosesAbdcDeg)
  if (timingBasis !== 'lift050' && timingBasis !== 'seat') {
    throw new RangeError(`timingBasis must be 'lift050' or 'seat' (got ${show(timingBasis)})`)
  }
  return timingBasis === 'lift050' ? intakeClosesAbdcDeg + SEAT_CLOSING_OFFSET_DEG : intakeClosesAbdcDeg
}

/** Clearance volume per cylinder in cm³: chamber + piston + gasket + deck volume. */
export function clearanceVolumeCc(input: CompressionInput): number {
  record('input', input, 'bore, stroke, chamber, piston, gasket and deck figures')
  const bore = positive('boreIn', input.boreIn)
  positive('strokeIn', input.strokeIn)
  const chamber = positive('chamberCc', input.chamberCc)
  const piston = finite('pistonCc', input.pistonCc)
  const gasketBore = positive('gasketBoreIn', input.gasketBoreIn)
  const gasketThickness = nonNegative('gasketThicknessIn', input.gasketThicknessIn)
  const deck = finite('deckClearanceIn', input.deckClearanceIn)
  const gasketCc = circleArea(gasketBore) * gasketThickness * CC_PER_CI
  const deckCc = circleArea(bore) * deck * CC_PER_CI
  const clearance = chamber + piston + gasketCc + deckCc
  if (clearance <= 0) {
    throw new RangeError(`these dimensions leave no clearance volume (${clearance.toFixed(2)} cc): the dome or the piston height is too large`)
  }
  return clearance
}

/** Static compression ratio: (swept + clearance) / clearance, per cylinder. */
export function staticCompressionRatio(input: CompressionInput): number {
  const clearance = clearanceVolumeCc(input)
  const swept = sweptVolumeCi(input.boreIn, input.strokeIn) * CC_PER_CI
  return (swept + clearance) / clearance
}

/**
 * Distance of the piston below TDC at crank angle θ from TDC, from the crank-slider relation
 * s = a cos θ + √(l² − a² sin² θ) (Heywood, Internal Combustion Engine Fundamentals, eq. 2.3):
 * the distance from TDC is l + a − s.
 */
export function pistonTravelIn(strokeIn: number, rodLengthIn: number, crankDegFromTdc: number): number {
  positive('strokeIn', strokeIn)
  positive('rodLengthIn', rodLengthIn)
  finite('crank angle', crankDegFromTdc)
  const a = strokeIn / 2
  if (rodLengthIn <= a) throw new RangeError(`rodLengthIn (${rodLengthIn}) must be longer than half the stroke (${a})`)
  const theta = (crankDegFromTdc * Math.PI) / 180
  const sin = Math.sin(theta)
  const s = a * Math.cos(theta) + Math.sqrt(rodLengthIn * rodLengthIn - a * a * sin * sin)
  return rodLengthIn + a - s
}

/** Stroke left once the intake valve closes (piston travel from TDC at IVC), in. */
export function effectiveStrokeIn(strokeIn: number, rodLengthIn: number, intakeClosesAbdcDeg: number): number {
  within('intakeClosesAbdcDeg', intakeClosesAbdcDeg, 0, 179, '°')
  return pistonTravelIn(strokeIn, rodLengthIn, 180 + intakeClosesAbdcDeg)
}

/**
 * Dynamic compression ratio: compression counted from the seat closing of the intake valve, the
 * effective stroke from the crank-slider geometry. A 0.050 in closing is moved to the seat first
 * (timingBasis 'lift050').
 */
export function dynamicCompressionRatio(input: DynamicCompressionInput): number {
  const clearance = clearanceVolumeCc(input)
  const ivc = seatIntakeClosingAbdcDeg(input.intakeClosesAbdcDeg, input.timingBasis ?? 'seat')
  const stroke = effectiveStrokeIn(input.strokeIn, input.rodLengthIn, ivc)
  const swept = circleArea(input.boreIn) * stroke * CC_PER_CI
  return (swept + clearance) / clearance
}

/** Mean piston speed in ft/min: 2 × stroke × rpm, stroke in feet (Heywood 1988, §2.2: S̄p = 2LN). */
export function meanPistonSpeedFtMin(strokeIn: number, rpm: number): number {
  positive('strokeIn', strokeIn)
  nonNegative('rpm', rpm)
  return (2 * strokeIn * rpm) / 12
}

/** Rod length over stroke (Heywood's R is l/a, twice this). */
export function rodStrokeRatio(rodLengthIn: number, strokeIn: number): number {
  positive('rodLengthIn', rodLengthIn)
  positive('strokeIn', strokeIn)
  if (rodLengthIn <= strokeIn / 2) throw new RangeError(`rodLengthIn (${rodLengthIn}) must be longer than half the stroke (${strokeIn / 2})`)
  return rodLengthIn / strokeIn
}

/** Bore over stroke. */
export function boreStrokeRatio(boreIn: number, strokeIn: number): number {
  return positive('boreIn', boreIn) / positive('strokeIn', strokeIn)
}
