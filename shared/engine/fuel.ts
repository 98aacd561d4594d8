/** Fuel and air: injector size from power and BSFC, flow unit conversion, and airflow. */
import { aboveZeroUpTo, positive, positiveInteger, record, within } from './guard'
import type { FuelKey } from './types'
import { G_PER_LB } from './units'

/**
 * Brake-specific fuel consumption of gasoline at full-load power mixtures, lb/(hp·h): about 0.50
 * naturally aspirated and 0.60 with a power adder, which runs richer for cooling (common practice
 * among engine shops; a tuner's measured figure always beats it).
 */
export const GASOLINE_BSFC = { na: 0.5, boosted: 0.6 } as const

/**
 * Stoichiometric air-fuel ratio of gasoline by mass, the reference every other fuel is scaled
 * against: 14.7 (the figure the trade and Heywood, Internal Combustion Engine Fundamentals, 1988,
 * App. D, use for gasoline — quoted from memory).
 */
export const GASOLINE_STOICH_AFR = 14.7

export interface FuelDefaults {
  label: string
  /**
   * Stoichiometric air-fuel ratio by mass. Methanol and ethanol from the combustion equations
   * (CH₃OH + 1.5 O₂, C₂H₅OH + 3 O₂ with air at 20.95 % O₂ by volume: 6.47 and 9.0); E85 blended by
   * mass from 85 % ethanol and 15 % gasoline by volume (about 9.8); gasolines 14.7.
   */
  stoichAfr: number
  /** Fuel per unit of air relative to gasoline: 14.7 / stoichAfr. */
  fuelRatio: number
  /** BSFC naturally aspirated, lb/(hp·h): GASOLINE_BSFC.na × fuelRatio. */
  bsfcNa: number
  /** BSFC with a power adder, lb/(hp·h): GASOLINE_BSFC.boosted × fuelRatio. */
  bsfcBoosted: number
  /** Liquid density near 15–20 °C, g/cm³ (typical handbook values, from memory). */
  densityGPerCc: number
}

/**
 * BSFC scaled from gasoline by the stoichiometric ratio: at the same air, the same mixture
 * strength (λ) and about the same energy released per kg of air, an engine burns fuel in
 * proportion to 1 / (A/F)s (the equal-energy-per-air rule, common practice for power mixtures).
 */
function fuel(label: string, stoichAfr: number, densityGPerCc: number): FuelDefaults {
  const fuelRatio = GASOLINE_STOICH_AFR / stoichAfr
  // Rounded up to the two decimals the calculator shows, so rounding never undersizes (the epsilon absorbs float noise).
  const round = (x: number): number => Math.ceil(x * 100 - 1e-9) / 100
  return { label, stoichAfr, fuelRatio, bsfcNa: round(GASOLINE_BSFC.na * fuelRatio), bsfcBoosted: round(GASOLINE_BSFC.boosted * fuelRatio), densityGPerCc }
}

/**
 * Starting points for sizing a fuel system, derived from the stoichiometric ratios above:
 * E85 needs about 1.5 × and methanol about 2.3 × the fuel of gasoline. Densities are typical
 * handbook values from memory (methanol 0.791 g/cm³ at 20 °C as in the CRC Handbook).
 * A tuner's measured figures always beat these.
 */
export const fuelDefaults: Record<FuelKey, FuelDefaults> = {
  pump_gas: fuel('Pump gasoline', 14.7, 0.74),
  race_gas: fuel('Race gasoline', 14.7, 0.72),
  e85: fuel('E85', 9.8, 0.78),
  methanol: fuel('Methanol', 6.4, 0.791),
}

export interface InjectorInput {
  hp: number
  /** lb of fuel per hp per hour. */
  bsfc: number
  injectors: number
  /** Highest duty cycle the injectors may run, as a fraction (0.80 for 80 %). */
  maxDutyCycle: number
}

/** Fuel the engine burns at a power, lb/h: hp × BSFC. */
export function fuelFlowLbHr(hp: number, bsfc: number): number {
  return positive('hp', hp) * within('bsfc', bsfc, 0.1, 3, 'lb/(hp·h)')
}

/** Static flow each injector needs, lb/h: hp × BSFC / (injectors × max duty cycle) (common practice). */
export function injectorSizeLbHr(input: InjectorInput): number {
  record('input', input, 'hp, bsfc, injectors and maxDutyCycle')
  const flow = fuelFlowLbHr(input.hp, input.bsfc)
  positiveInteger('injectors', input.injectors)
  const duty = aboveZeroUpTo('maxDutyCycle', input.maxDutyCycle, 1, '(a fraction: 0.8 means 80 %)')
  return flow / (input.injectors * duty)
}

/** lb/h to cm³/min for a fuel density: lb/h × 453.59237 g/lb ÷ 60 min/h ÷ density. */
export function lbHrToCcMin(lbHr: number, fuelDensityGPerCc: number): number {
  positive('lbHr', lbHr)
  within('fuelDensityGPerCc', fuelDensityGPerCc, 0.3, 2, 'g/cm³')
  return (lbHr * G_PER_LB) / 60 / fuelDensityGPerCc
}

/** cm³/min to lb/h for a fuel density. */
export function ccMinToLbHr(ccMin: number, fuelDensityGPerCc: number): number {
  positive('ccMin', ccMin)
  within('fuelDensityGPerCc', fuelDensityGPerCc, 0.3, 2, 'g/cm³')
  return (ccMin * fuelDensityGPerCc * 60) / G_PER_LB
}

/**
 * Air an engine draws, ft³/min, four-stroke: ci × rpm × VE / 3456 (handbook relation:
 * 1728 in³ per ft³, and each cylinder fills once every two revolutions).
 */
export function airflowCfm(ci: number, rpm: number, volumetricEfficiency: number): number {
  positive('ci', ci)
  positive('rpm', rpm)
  aboveZeroUpTo('volumetricEfficiency', volumetricEfficiency, 5, '(a fraction: 0.9 means 90 %)')
  return (ci * rpm * volumetricEfficiency) / 3456
}
