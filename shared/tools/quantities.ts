/**
 * The two unit systems of the calculators page and the quantities whose unit follows them.
 * Every conversion is one of the engine module's NIST SP 811 conversions (shared/engine/units.ts).
 */
import { ciToLitres, litresToCi } from '../engine/geometry'
import {
  bsfcToImperial, bsfcToMetric, cfmToM3Min, cToF, fToC, ftMinToMs, hpToKw, inHgToKpa, inToMm, kgHrToLbHr, kpaToInHg, kpaToPsi,
  kwToHp, lbFtToNm, lbHrToKgHr, m3MinToCfm, mmToIn, msToFtMin, nmToLbFt, psiToKpa,
} from '../engine/units'
import type { UnitSystem } from '../schemas/auth'

// The app's one pair of unit systems (the viewer's preference, stores/units.ts).
export { UNIT_SYSTEMS, type UnitSystem } from '../schemas/auth'

export interface QuantityUnits {
  imperial: string
  metric: string
  /** From the imperial unit (the engine module's own) to the metric one. */
  toMetric: (value: number) => number
  toImperial: (value: number) => number
}

/**
 * Imperial is what the engine module computes in; metric is converted on the way in and out.
 * Labels match shared/units/display.ts, which shows stored figures across the rest of the app.
 */
export const QUANTITIES = {
  length: { imperial: 'in', metric: 'mm', toMetric: inToMm, toImperial: mmToIn },
  displacement: { imperial: 'ci', metric: 'L', toMetric: ciToLitres, toImperial: litresToCi },
  power: { imperial: 'hp', metric: 'kW', toMetric: hpToKw, toImperial: kwToHp },
  torque: { imperial: 'lb·ft', metric: 'N·m', toMetric: lbFtToNm, toImperial: nmToLbFt },
  barometer: { imperial: 'inHg', metric: 'kPa', toMetric: inHgToKpa, toImperial: kpaToInHg },
  temperature: { imperial: '°F', metric: '°C', toMetric: fToC, toImperial: cToF },
  pressure: { imperial: 'psi', metric: 'kPa', toMetric: psiToKpa, toImperial: kpaToPsi },
  pistonSpeed: { imperial: 'ft/min', metric: 'm/s', toMetric: ftMinToMs, toImperial: msToFtMin },
  airflow: { imperial: 'cfm', metric: 'm³/min', toMetric: cfmToM3Min, toImperial: m3MinToCfm },
  fuelFlow: { imperial: 'lb/h', metric: 'kg/h', toMetric: lbHrToKgHr, toImperial: kgHrToLbHr },
  bsfc: { imperial: 'lb/(hp·h)', metric: 'g/(kW·h)', toMetric: bsfcToMetric, toImperial: bsfcToImperial },
} satisfies Record<string, QuantityUnits>

export type Quantity = keyof typeof QUANTITIES

/** The unit a quantity is shown in under a system. */
export function unitOf(quantity: Quantity, system: UnitSystem): string {
  return QUANTITIES[quantity][system]
}

/** A value in the module's (imperial) unit, shown in the system's unit. */
export function fromImperial(quantity: Quantity, value: number, system: UnitSystem): number {
  return system === 'imperial' ? value : QUANTITIES[quantity].toMetric(value)
}

/** A value entered in the system's unit, in the module's (imperial) unit. */
export function toImperial(quantity: Quantity, value: number, system: UnitSystem): number {
  return system === 'imperial' ? value : QUANTITIES[quantity].toImperial(value)
}

/** A value from one system's unit to another's. */
export function convertBetween(quantity: Quantity, value: number, from: UnitSystem, to: UnitSystem): number {
  return from === to ? value : fromImperial(quantity, toImperial(quantity, value, from), to)
}
