import { cToF, ccToCi, ciToCc, fToC, hpToKw, inHgToKpa, inToMm, kpaToInHg, kwToHp, lbFtToNm, mmToIn, nmToLbFt } from '../engine/units'
import type { UnitSystem } from '../schemas/auth'

/**
 * Figures as the viewer reads them: the app stores imperial values (hp, lb·ft, cubic inches,
 * inches) and converts for metric viewers with the NIST SP 811 factors of shared/engine/units.
 */
export type FigureKind = 'power' | 'torque' | 'displacement' | 'length' | 'specificPower' | 'pressure' | 'temperature'

export interface DisplayFigure {
  value: number
  unit: string
  digits: number
}

const IMPERIAL: Record<FigureKind, string> = { power: 'hp', torque: 'lb·ft', displacement: 'ci', length: 'in', specificPower: 'hp/ci', pressure: 'inHg', temperature: '°F' }
const METRIC: Record<FigureKind, string> = { power: 'kW', torque: 'N·m', displacement: 'L', length: 'mm', specificPower: 'kW/L', pressure: 'kPa', temperature: '°C' }

/** A stored (imperial) figure in the viewer's system; `digits` is the precision the imperial figure was shown with. */
export function toDisplay(kind: FigureKind, imperial: number, system: UnitSystem, digits = 0): DisplayFigure {
  if (system === 'imperial') return { value: imperial, unit: IMPERIAL[kind], digits }
  switch (kind) {
    case 'power': return { value: hpToKw(imperial), unit: METRIC.power, digits }
    case 'torque': return { value: lbFtToNm(imperial), unit: METRIC.torque, digits }
    // Litres read to two decimals (5.74 L) where cubic inches read to none or one (350 ci).
    case 'displacement': return { value: ciToCc(imperial) / 1000, unit: METRIC.displacement, digits: digits + 2 }
    // Millimetres need one digit fewer than inches to the same precision (4.030 in → 102.36 mm).
    case 'length': return { value: inToMm(imperial), unit: METRIC.length, digits: Math.max(0, digits - 1) }
    // hp per cubic inch to kW per litre: about 45.5 times the number, so one decimal reads as well as two did.
    case 'specificPower': return { value: hpToKw(imperial) / (ciToCc(1) / 1000), unit: METRIC.specificPower, digits: Math.max(0, digits - 1) }
    // Barometer: 29.92 inHg reads 101.3 kPa, so one decimal either way.
    case 'pressure': return { value: inHgToKpa(imperial), unit: METRIC.pressure, digits }
    case 'temperature': return { value: fToC(imperial), unit: METRIC.temperature, digits }
  }
}

/** A figure typed in the viewer's system back to the stored imperial value (the inverse of toDisplay). */
export function fromDisplay(kind: FigureKind, shown: number, system: UnitSystem): number {
  if (system === 'imperial') return shown
  switch (kind) {
    case 'power': return kwToHp(shown)
    case 'torque': return nmToLbFt(shown)
    case 'displacement': return ccToCi(shown * 1000)
    case 'length': return mmToIn(shown)
    case 'specificPower': return kwToHp(shown) * (ciToCc(1) / 1000)
    case 'pressure': return kpaToInHg(shown)
    case 'temperature': return cToF(shown)
  }
}

export function unitLabel(kind: FigureKind, system: UnitSystem): string {
  return (system === 'imperial' ? IMPERIAL : METRIC)[kind]
}
