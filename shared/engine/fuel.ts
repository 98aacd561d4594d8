/** Fuel and air: injector size from power and BSFC, flow unit conversion, and airflow. */
import { positive, positiveInteger, within } from './guard'
import type { FuelKey } from './types'
import { G_PER_LB } from './units'

export interface FuelDefaults {
  label: string
  /** Brake-specific fuel consumption in lb/(hp·h), naturally aspirated (common practice). */
  bsfcNa: number
  /** BSFC with a power adder (common practice: boosted engines run richer). */
  bsfcBoosted: number
  /** Liquid density near 15–20 °C, g/cm³ (typical handbook values, from memory). */
  densityGPerCc: number
}

/**
 * Starting points for sizing a fuel system. The BSFC figures are common practice among engine
 * builders (pump gas about 0.50 NA and 0.60 boosted, E85 about 30 % more fuel, methanol about
 * twice gasoline); densities are typical handbook values from memory (methanol 0.791 g/cm³ at
 * 20 °C as in the CRC Handbook). A tuner's measured figures always beat these.
 */
export const fuelDefaults: Record<FuelKey, FuelDefaults> = {
  pump_gas: { label: 'Pump gasoline', bsfcNa: 0.5, bsfcBoosted: 0.6, densityGPerCc: 0.74 },
  race_gas: { label: 'Race gasoline', bsfcNa: 0.48, bsfcBoosted: 0.58, densityGPerCc: 0.72 },
  e85: { label: 'E85', bsfcNa: 0.7, bsfcBoosted: 0.8, densityGPerCc: 0.78 },
  methanol: { label: 'Methanol', bsfcNa: 1.0, bsfcBoosted: 1.15, densityGPerCc: 0.791 },
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
  const flow = fuelFlowLbHr(input.hp, input.bsfc)
  positiveInteger('injectors', input.injectors)
  const duty = within('maxDutyCycle', input.maxDutyCycle, Number.MIN_VALUE, 1, '(a fraction: 0.8 means 80 %)')
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
  within('volumetricEfficiency', volumetricEfficiency, Number.MIN_VALUE, 5, '(a fraction: 0.9 means 90 %)')
  return (ci * rpm * volumetricEfficiency) / 3456
}
