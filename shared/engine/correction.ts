/**
 * Atmospheric correction of engine power to a standard's reference conditions, and conversion
 * of a curve from one standard to another.
 */
import { assertPoint } from './curves'
import { record, show, within } from './guard'
import type { CorrectionSpec, CorrectionStandard, PullPoint, Weather } from './types'
import { CORRECTION_STANDARDS } from './types'
import { fToC, inHgToKpa, inHgToMbar, kpaToInHg } from './units'

/** The saturation-pressure formula used for the water-vapour partial pressure. */
export const SATURATION_FORMULA = 'Arden Buck equation over water (Buck 1981, coefficients as revised by Buck 1996)'

/**
 * Saturation vapour pressure of water in kPa at a temperature in °C, by the Arden Buck equation:
 * e_s = 0.61121 exp((18.678 − T/234.5) (T / (257.14 + T))). Good to about 0.05 % from −40 to 50 °C.
 */
export function saturationPressureKpa(tempC: number): number {
  within('temperature', tempC, -80, 100, '°C')
  return 0.61121 * Math.exp((18.678 - tempC / 234.5) * (tempC / (257.14 + tempC)))
}

/** Checks a weather record is physically possible; returns it. */
export function validateWeather(weather: Weather): Weather {
  if (weather === null || typeof weather !== 'object') throw new RangeError('weather must give baroInHg, airTempF and humidityPct')
  within('baroInHg', weather.baroInHg, 15, 35, 'inHg (a barometer reading in inches of mercury, not kPa or mbar)')
  within('airTempF', weather.airTempF, -76, 158, '°F')
  within('humidityPct', weather.humidityPct, 0, 100, '%')
  return weather
}

/** The pressures and temperature a correction works from. */
export interface AirState {
  tempC: number
  totalKpa: number
  vapourKpa: number
  dryKpa: number
}

/** Vapour pressure = RH × e_s(T); dry-air pressure = barometer − vapour pressure. */
export function airState(weather: Weather): AirState {
  validateWeather(weather)
  const tempC = fToC(weather.airTempF)
  const totalKpa = inHgToKpa(weather.baroInHg)
  const vapourKpa = (weather.humidityPct / 100) * saturationPressureKpa(tempC)
  const dryKpa = totalKpa - vapourKpa
  if (dryKpa <= 0) throw new RangeError('the water-vapour pressure exceeds the barometer: check the weather figures')
  return { tempC, totalKpa, vapourKpa, dryKpa }
}

/** SAE J1349 form: cf = k × (99/Pd) × √((T+273)/298) − (k − 1), Pd dry kPa, T °C. */
function saeJ1349(k: number, air: AirState): number {
  return k * (99 / air.dryKpa) * Math.sqrt((air.tempC + 273) / 298) - (k - 1)
}

/**
 * SAE J607 ("STD"): cf = (29.92 / Pd) × √((T + 459.67) / 519.67), Pd dry inHg, T °F: the standard's
 * 60 °F reference in degrees Rankine, with the exact 459.67 offset (NIST SP 811 B.8: T/°R = t/°F + 459.67)
 * where the usual form rounds to 460 and 520.
 */
function saeJ607(air: AirState, tempF: number): number {
  return (29.92 / kpaToInHg(air.dryKpa)) * Math.sqrt((tempF + 459.67) / 519.67)
}

/** DIN 70020: cf = (1013 / p) × √((273 + t) / 293), p total mbar, t °C; humidity is not used. */
function din70020(weather: Weather): number {
  const tempC = fToC(weather.airTempF)
  return (1013 / inHgToMbar(weather.baroInHg)) * Math.sqrt((273 + tempC) / 293)
}

/** ISO 1585 / ECE R85 (EEC 80/1269) for spark-ignition engines: αa = (99/Pd)^1.2 × (T/298)^0.6, T in K. */
function iso1585(air: AirState): number {
  return Math.pow(99 / air.dryKpa, 1.2) * Math.pow((air.tempC + 273) / 298, 0.6)
}

const STANDARD_IDS: readonly string[] = CORRECTION_STANDARDS.map(s => s.id)

/** True when the value names a correction standard Torquewright knows. */
export function isCorrectionStandard(value: unknown): value is CorrectionStandard {
  return typeof value === 'string' && STANDARD_IDS.includes(value)
}

function requireStandard(standard: CorrectionStandard): CorrectionStandard {
  if (!isCorrectionStandard(standard)) throw new RangeError(`standard must be one of ${STANDARD_IDS.join(', ')} (got ${show(standard)})`)
  return standard
}

/** The factor that multiplies observed power to give power under the standard ('UNCORRECTED' is 1). */
export function correctionFactor(standard: CorrectionStandard, weather: Weather): number {
  requireStandard(standard)
  if (standard === 'UNCORRECTED') return 1
  validateWeather(weather)
  if (standard === 'DIN_70020') return din70020(weather)
  const air = airState(weather)
  switch (standard) {
    case 'SAE_J1349_1990': return saeJ1349(1.18, air)
    case 'SAE_J1349_2004': return saeJ1349(1.176, air)
    case 'SAE_J607': return saeJ607(air, weather.airTempF)
    case 'ISO_1585': return iso1585(air)
  }
}

/** The allowed ranges Torquewright applies for each standard. */
export interface StandardLimits {
  factorMin: number
  factorMax: number
  tempMinC: number | null
  tempMaxC: number | null
  dryPressureMinKpa: number | null
  dryPressureMaxKpa: number | null
  /** Where the figures come from, said plainly. */
  source: string
}

/**
 * The published air-temperature band of the spark-ignition correction: 283.2 K < T < 318.2 K
 * (EU Regulation 134/2014, Annex I, Appendix 2.2, which carries the ISO 1585 / ECE R85 method).
 */
export const PUBLISHED_TEMP_BAND_C = { min: 283.2 - 273.15, max: 318.2 - 273.15 } as const

const PUBLISHED = 'Air temperature 283.2–318.2 K (10.05–45.05 °C): EU Regulation 134/2014, Annex I, Appendix 2.2'
const OWN_BANDS = 'factor 0.93–1.07 and dry-air pressure 80–110 kPa: Torquewright\'s own plausibility bands (common practice, not from a standard)'

/**
 * Allowed ranges. The temperature band is the published one for ISO 1585 / ECE R85 (see
 * PUBLISHED_TEMP_BAND_C); SAE J1349's own band is not available to us, so the same published band is
 * applied to it. The factor and dry-pressure bands are our own plausibility bands, the same for
 * all three. DIN 70020 and SAE J607 get a sanity band of our own on the factor only (0.90–1.10).
 */
export const STANDARD_LIMITS: Record<Exclude<CorrectionStandard, 'UNCORRECTED'>, StandardLimits> = {
  SAE_J1349_2004: { factorMin: 0.93, factorMax: 1.07, tempMinC: PUBLISHED_TEMP_BAND_C.min, tempMaxC: PUBLISHED_TEMP_BAND_C.max, dryPressureMinKpa: 80, dryPressureMaxKpa: 110, source: `${PUBLISHED} (SAE J1349's own band not held, so the published ISO 1585 band is applied); ${OWN_BANDS}` },
  SAE_J1349_1990: { factorMin: 0.93, factorMax: 1.07, tempMinC: PUBLISHED_TEMP_BAND_C.min, tempMaxC: PUBLISHED_TEMP_BAND_C.max, dryPressureMinKpa: 80, dryPressureMaxKpa: 110, source: `${PUBLISHED} (SAE J1349's own band not held, so the published ISO 1585 band is applied); ${OWN_BANDS}` },
  ISO_1585: { factorMin: 0.93, factorMax: 1.07, tempMinC: PUBLISHED_TEMP_BAND_C.min, tempMaxC: PUBLISHED_TEMP_BAND_C.max, dryPressureMinKpa: 80, dryPressureMaxKpa: 110, source: `${PUBLISHED}; ${OWN_BANDS}` },
  DIN_70020: { factorMin: 0.9, factorMax: 1.1, tempMinC: null, tempMaxC: null, dryPressureMinKpa: null, dryPressureMaxKpa: null, source: 'Factor 0.90–1.10: Torquewright\'s own sanity band (common practice; no published band applied)' },
  SAE_J607: { factorMin: 0.9, factorMax: 1.1, tempMinC: null, tempMaxC: null, dryPressureMinKpa: null, dryPressureMaxKpa: null, source: 'Factor 0.90–1.10: Torquewright\'s own sanity band (common practice; no published band applied)' },
}

export interface CorrectionValidity {
  standard: CorrectionStandard
  factor: number
  valid: boolean
  /** Why not, in words a person can act on; empty when valid. */
  reasons: string[]
  limits: StandardLimits | null
  air: AirState
}

const fmt = (value: number, digits: number): string => value.toFixed(digits)

/** Whether the weather and the resulting factor lie inside what the standard allows, and why not. */
export function correctionValidity(standard: CorrectionStandard, weather: Weather): CorrectionValidity {
  requireStandard(standard)
  const air = airState(weather)
  const factor = correctionFactor(standard, weather)
  if (standard === 'UNCORRECTED') return { standard, factor, valid: true, reasons: [], limits: null, air }
  const limits = STANDARD_LIMITS[standard]
  const reasons: string[] = []
  if (factor < limits.factorMin || factor > limits.factorMax) {
    reasons.push(`the factor ${fmt(factor, 4)} lies outside ${fmt(limits.factorMin, 2)}–${fmt(limits.factorMax, 2)}`)
  }
  if (limits.tempMinC !== null && air.tempC < limits.tempMinC) {
    reasons.push(`air temperature ${fmt(air.tempC, 1)} °C is below the ${fmt(limits.tempMinC, 2)} °C the standard allows`)
  }
  if (limits.tempMaxC !== null && air.tempC > limits.tempMaxC) {
    reasons.push(`air temperature ${fmt(air.tempC, 1)} °C is above the ${fmt(limits.tempMaxC, 2)} °C the standard allows`)
  }
  if (limits.dryPressureMinKpa !== null && air.dryKpa < limits.dryPressureMinKpa) {
    reasons.push(`dry-air pressure ${fmt(air.dryKpa, 1)} kPa is below the ${limits.dryPressureMinKpa} kPa the standard allows`)
  }
  if (limits.dryPressureMaxKpa !== null && air.dryKpa > limits.dryPressureMaxKpa) {
    reasons.push(`dry-air pressure ${fmt(air.dryKpa, 1)} kPa is above the ${limits.dryPressureMaxKpa} kPa the standard allows`)
  }
  return { standard, factor, valid: reasons.length === 0, reasons, limits, air }
}

/** The factor a spec stands for: 1 when the standard is 'UNCORRECTED' or the weather is unknown. */
export function specFactor(spec: CorrectionSpec): { factor: number, uncorrected: boolean } {
  record('spec', spec, 'a standard and, optionally, the weather')
  requireStandard(spec.standard)
  if (spec.standard === 'UNCORRECTED' || !spec.weather) return { factor: 1, uncorrected: true }
  return { factor: correctionFactor(spec.standard, spec.weather), uncorrected: false }
}

export interface ConvertedCurve {
  points: PullPoint[]
  fromFactor: number
  toFactor: number
  /** toFactor / fromFactor: what every power and torque figure was multiplied by. */
  ratio: number
  standard: CorrectionStandard
  /** True when the result is not corrected to the target standard (target uncorrected, or weather unknown). */
  uncorrected: boolean
  notes: string[]
}

/** Re-express a curve under another standard: raw = observed / factor(from), target = raw × factor(to). */
export function convertCurve(points: PullPoint[], from: CorrectionSpec, to: CorrectionSpec): ConvertedCurve {
  if (!Array.isArray(points)) throw new RangeError('points must be an array')
  points.forEach((p, i) => assertPoint(p, `points[${i}]`))
  const source = specFactor(record(`from`, from, 'a standard and, optionally, the weather'))
  const target = specFactor(record(`to`, to, 'a standard and, optionally, the weather'))
  const notes: string[] = []
  if (from.standard !== 'UNCORRECTED' && !from.weather) {
    notes.push('The source standard was named without weather, so its figures are taken as uncorrected.')
  }
  if (to.standard !== 'UNCORRECTED' && !to.weather) {
    notes.push('No weather for the target standard: figures are shown uncorrected.')
  }
  const ratio = target.factor / source.factor
  const converted = points.map((p) => {
    const out: PullPoint = { rpm: p.rpm, hp: p.hp * ratio }
    if (p.lbFt !== undefined) out.lbFt = p.lbFt * ratio
    return out
  })
  return { points: converted, fromFactor: source.factor, toFactor: target.factor, ratio, standard: to.standard, uncorrected: target.uncorrected, notes }
}
