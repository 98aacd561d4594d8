import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  CORRECTION_STANDARDS, PUBLISHED_TEMP_BAND_C, SATURATION_FORMULA, STANDARD_LIMITS, convertCurve, correctionFactor, correctionValidity, saturationPressureKpa,
} from '../../../shared/engine'
import type { CorrectionStandard, PullPoint, Weather } from '../../../shared/engine'
import { inventedPull, math, rel } from './helpers'

/** A weather record for a dry pressure in kPa at a temperature in °C, converted with mathjs units. */
function weatherAt(totalKpa: number, tempC: number, humidityPct = 0): Weather {
  return {
    baroInHg: math.unit(totalKpa, 'kPa').toNumber('inHg'),
    airTempF: math.unit(tempC, 'degC').toNumber('degF'),
    humidityPct,
  }
}

const steamTable: Array<[number, number]> = [
  // Saturation pressure of water, kPa (IAPWS-IF97 steam tables, as reproduced in the CRC Handbook; values from memory).
  [10, 1.2282], [20, 2.3392], [25, 3.1699], [30, 4.2470], [40, 7.3849],
]

describe('water-vapour saturation pressure', () => {
  it(`uses the named formula (${SATURATION_FORMULA})`, () => {
    expect(SATURATION_FORMULA).toMatch(/Buck/)
  })
  it.each(steamTable)('at %d °C matches the steam-table value %f kPa within 0.3 % (IAPWS-IF97 / CRC Handbook, from memory)', (tempC, kpa) => {
    expect(rel(saturationPressureKpa(tempC), kpa)).toBeLessThan(0.003)
  })
  it('agrees with the Magnus–Tetens form of Alduchov & Eskridge (1996) within 0.5 % from 0 to 45 °C (property)', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 45, noNaN: true }), (t) => {
      const magnus = 0.61094 * Math.exp((17.625 * t) / (t + 243.04))
      return rel(saturationPressureKpa(t), magnus) < 0.005
    }))
  })
})

describe('correction factors at each standard\'s reference conditions are 1', () => {
  // weatherAt converts kPa with mathjs, whose mmHg (133.322 Pa) is rounded: hence 1e-5, not exact.
  it('SAE J1349 (1990 and 2004): 99 kPa dry air, 25 °C', () => {
    expect(Math.abs(correctionFactor('SAE_J1349_1990', weatherAt(99, 25)) - 1)).toBeLessThan(1e-5)
    expect(Math.abs(correctionFactor('SAE_J1349_2004', weatherAt(99, 25)) - 1)).toBeLessThan(1e-5)
  })
  it('SAE J1349: 100 kPa total with 1 kPa of water vapour at 25 °C is its reference (vapour from the steam table)', () => {
    const rh = (1 / 3.1699) * 100
    expect(Math.abs(correctionFactor('SAE_J1349_2004', weatherAt(100, 25, rh)) - 1)).toBeLessThan(0.001)
  })
  it('SAE J607: 60 °F and 29.92 inHg of dry air ("STD")', () => {
    expect(correctionFactor('SAE_J607', { baroInHg: 29.92, airTempF: 60, humidityPct: 0 })).toBeCloseTo(1, 9)
  })
  it('DIN 70020: 20 °C and 1013 mbar total pressure, humidity not used', () => {
    const w = { baroInHg: math.unit(1013, 'mbar').toNumber('inHg'), airTempF: 68, humidityPct: 0 }
    expect(correctionFactor('DIN_70020', w)).toBeCloseTo(1, 5)
    expect(correctionFactor('DIN_70020', { ...w, humidityPct: 85 })).toBe(correctionFactor('DIN_70020', w))
  })
  it('ISO 1585 / ECE R85: 99 kPa dry air, 298 K', () => {
    expect(Math.abs(correctionFactor('ISO_1585', weatherAt(99, 25)) - 1)).toBeLessThan(1e-5)
  })
  it('UNCORRECTED is always 1', () => {
    expect(correctionFactor('UNCORRECTED', { baroInHg: 25, airTempF: 110, humidityPct: 90 })).toBe(1)
  })
})

describe('correction factors on an invented hot, humid day (29.12 inHg, 88 °F, 55 %)', () => {
  const w: Weather = { baroInHg: 29.12, airTempF: 88, humidityPct: 55 }
  // Expected values worked from each standard's formula, with unit conversions by mathjs and
  // the vapour pressure from the Magnus–Tetens form (a second, independent formula; tolerance covers the difference).
  const tC = math.unit(88, 'degF').toNumber('degC')
  const total = math.unit(29.12, 'inHg').toNumber('kPa')
  const dry = total - 0.55 * 0.61094 * Math.exp((17.625 * tC) / (tC + 243.04))
  it('SAE J1349 (2004): 1.176 × (99/Pd) × √((T+273)/298) − 0.176', () => {
    expect(rel(correctionFactor('SAE_J1349_2004', w), 1.176 * (99 / dry) * Math.sqrt((tC + 273) / 298) - 0.176)).toBeLessThan(2e-4)
  })
  it('SAE J1349 (1990): 1.18 × (99/Pd) × √((T+273)/298) − 0.18', () => {
    expect(rel(correctionFactor('SAE_J1349_1990', w), 1.18 * (99 / dry) * Math.sqrt((tC + 273) / 298) - 0.18)).toBeLessThan(2e-4)
  })
  it('SAE J607: (29.92/Pd) × √((T°F + 459.67)/519.67), dry inHg, with the exact Rankine offset (NIST SP 811 B.8: T/°R = t/°F + 459.67)', () => {
    const dryInHg = math.unit(dry, 'kPa').toNumber('inHg')
    expect(rel(correctionFactor('SAE_J607', w), (29.92 / dryInHg) * Math.sqrt((88 + 459.67) / 519.67))).toBeLessThan(2e-4)
  })
  it('SAE J607 on dry air uses 459.67 and 519.67 exactly, not the rounded 460 and 520 (NIST SP 811 B.8)', () => {
    const f = correctionFactor('SAE_J607', { baroInHg: 28.5, airTempF: 100, humidityPct: 0 })
    const exact = (29.92 / 28.5) * Math.sqrt((100 + 459.67) / 519.67)
    const rounded = (29.92 / 28.5) * Math.sqrt((100 + 460) / 520)
    expect(rel(f, exact)).toBeLessThan(1e-12)
    expect(rel(f, rounded)).toBeGreaterThan(1e-5)
  })
  it('DIN 70020: (1013/p) × √((273 + t)/293), p total mbar', () => {
    const mbar = math.unit(29.12, 'inHg').toNumber('mbar')
    expect(rel(correctionFactor('DIN_70020', w), (1013 / mbar) * Math.sqrt((273 + tC) / 293))).toBeLessThan(1e-5)
  })
  it('ISO 1585 / ECE R85 (EEC 80/1269): (99/Pd)^1.2 × (T/298)^0.6', () => {
    expect(rel(correctionFactor('ISO_1585', w), (99 / dry) ** 1.2 * ((tC + 273) / 298) ** 0.6)).toBeLessThan(2e-4)
  })
})

describe('how the factors move with the weather (properties)', () => {
  const weather = fc.record({
    baroInHg: fc.double({ min: 24, max: 31, noNaN: true }),
    airTempF: fc.double({ min: 40, max: 110, noNaN: true }),
    humidityPct: fc.double({ min: 0, max: 100, noNaN: true }),
  })
  const corrected: CorrectionStandard[] = ['SAE_J1349_1990', 'SAE_J1349_2004', 'SAE_J607', 'DIN_70020', 'ISO_1585']
  it('every factor rises with temperature and falls with barometer', () => {
    fc.assert(fc.property(weather, fc.constantFrom(...corrected), (w, s) =>
      correctionFactor(s, { ...w, airTempF: w.airTempF + 5 }) > correctionFactor(s, w)
      && correctionFactor(s, { ...w, baroInHg: w.baroInHg + 0.3 }) < correctionFactor(s, w)))
  })
  it('dry-air standards rise with humidity; DIN 70020 ignores it', () => {
    fc.assert(fc.property(weather, (w) => {
      const humid = { ...w, humidityPct: Math.min(100, w.humidityPct + 20) }
      if (humid.humidityPct - w.humidityPct < 1) return true
      return correctionFactor('SAE_J1349_2004', humid) > correctionFactor('SAE_J1349_2004', w)
        && correctionFactor('ISO_1585', humid) > correctionFactor('ISO_1585', w)
        && correctionFactor('DIN_70020', humid) === correctionFactor('DIN_70020', w)
    }))
  })
  it('throws a RangeError on humidity over 100 %, a negative humidity, a zero barometer or a reading in kPa', () => {
    expect(() => correctionFactor('SAE_J1349_2004', { baroInHg: 29.9, airTempF: 70, humidityPct: 101 })).toThrow(RangeError)
    expect(() => correctionFactor('SAE_J1349_2004', { baroInHg: 29.9, airTempF: 70, humidityPct: -3 })).toThrow(RangeError)
    expect(() => correctionFactor('ISO_1585', { baroInHg: 0, airTempF: 70, humidityPct: 30 })).toThrow(RangeError)
    expect(() => correctionFactor('DIN_70020', { baroInHg: 101.3, airTempF: 70, humidityPct: 30 })).toThrow(/inHg/)
    expect(() => correctionFactor('NOT_A_STANDARD' as CorrectionStandard, { baroInHg: 29.9, airTempF: 70, humidityPct: 30 })).toThrow(RangeError)
  })
})

describe('correctionValidity (temperature band of EU Regulation 134/2014, Annex I, Appendix 2.2; factor and pressure bands our own)', () => {
  it('reference conditions are valid for every standard', () => {
    for (const s of CORRECTION_STANDARDS) expect(correctionValidity(s.id, weatherAt(99.5, 25, 20)).valid).toBe(true)
  })
  it('air at 46 °C lies outside 283.2 K < T < 318.2 K (EU Regulation 134/2014, Annex I, App. 2.2) for SAE J1349 and ISO 1585, and the reason says so', () => {
    const hot = weatherAt(99, 46, 10)
    for (const s of ['SAE_J1349_2004', 'ISO_1585'] as const) {
      const v = correctionValidity(s, hot)
      expect(v.valid).toBe(false)
      expect(v.reasons.join(' ')).toMatch(/temperature/)
    }
  })
  it('the temperature band is 283.2 K < T < 318.2 K (EU Regulation 134/2014, Annex I, Appendix 2.2) for ISO 1585 and both SAE J1349 editions; every band names its source and none is "from memory"', () => {
    expect(PUBLISHED_TEMP_BAND_C.min).toBeCloseTo(283.2 - 273.15, 12)
    expect(PUBLISHED_TEMP_BAND_C.max).toBeCloseTo(318.2 - 273.15, 12)
    for (const s of ['SAE_J1349_2004', 'SAE_J1349_1990', 'ISO_1585'] as const) {
      expect(STANDARD_LIMITS[s].tempMinC).toBeCloseTo(10.05, 9)
      expect(STANDARD_LIMITS[s].tempMaxC).toBeCloseTo(45.05, 9)
      expect(STANDARD_LIMITS[s].source).toMatch(/EU Regulation 134\/2014, Annex I, Appendix 2\.2/)
      // 12 °C and 44 °C lie inside the published band; 9 °C and 46 °C outside it.
      expect(correctionValidity(s, weatherAt(99, 12, 10)).reasons.some(r => /temperature/.test(r))).toBe(false)
      expect(correctionValidity(s, weatherAt(99, 44, 10)).reasons.some(r => /temperature/.test(r))).toBe(false)
      expect(correctionValidity(s, weatherAt(99, 9, 10)).reasons.some(r => /below the 10\.05 °C/.test(r))).toBe(true)
      expect(correctionValidity(s, weatherAt(99, 46, 10)).reasons.some(r => /above the 45\.05 °C/.test(r))).toBe(true)
    }
    for (const limits of Object.values(STANDARD_LIMITS)) {
      expect(limits.source).not.toMatch(/memory/i)
      expect(limits.source.length).toBeGreaterThan(20)
    }
  })
  it('a high-altitude barometer (24 inHg) pushes the ISO 1585 factor past 1.07 and the reason names the factor', () => {
    const v = correctionValidity('ISO_1585', { baroInHg: 24, airTempF: 77, humidityPct: 10 })
    expect(v.factor).toBeGreaterThan(1.07)
    expect(v.valid).toBe(false)
    expect(v.reasons.some(r => /factor/.test(r))).toBe(true)
  })
})

describe('convertCurve', () => {
  const points = inventedPull({ stepRpm: 100 })
  const w: Weather = { baroInHg: 28.7, airTempF: 91, humidityPct: 35 }
  it('raw = observed / factor(from); target = raw × factor(to)', () => {
    const out = convertCurve(points, { standard: 'UNCORRECTED', weather: w }, { standard: 'SAE_J1349_2004', weather: w })
    const cf = correctionFactor('SAE_J1349_2004', w)
    out.points.forEach((p, i) => {
      expect(rel(p.hp, points[i]!.hp * cf)).toBeLessThan(1e-12)
      expect(rel(p.lbFt!, points[i]!.lbFt! * cf)).toBeLessThan(1e-12)
    })
    expect(out.uncorrected).toBe(false)
  })
  it('converting to another standard and back returns the curve (property)', () => {
    const weather = fc.record({
      baroInHg: fc.double({ min: 24, max: 31, noNaN: true }),
      airTempF: fc.double({ min: 30, max: 115, noNaN: true }),
      humidityPct: fc.double({ min: 0, max: 100, noNaN: true }),
    })
    const ids = CORRECTION_STANDARDS.map(s => s.id)
    fc.assert(fc.property(weather, fc.constantFrom(...ids), fc.constantFrom(...ids), fc.double({ min: 200, max: 900, noNaN: true }), (wx, a, b, peakTq) => {
      const curve: PullPoint[] = inventedPull({ stepRpm: 250, peakTq })
      const there = convertCurve(curve, { standard: a, weather: wx }, { standard: b, weather: wx })
      const back = convertCurve(there.points, { standard: b, weather: wx }, { standard: a, weather: wx })
      return back.points.every((p, i) => rel(p.hp, curve[i]!.hp) < 1e-12 && rel(p.lbFt!, curve[i]!.lbFt!) < 1e-12 && p.rpm === curve[i]!.rpm)
    }))
  })
  it('without weather the factor is 1 and the result says it is uncorrected', () => {
    const out = convertCurve(points, { standard: 'UNCORRECTED' }, { standard: 'SAE_J1349_2004', weather: null })
    expect(out.toFactor).toBe(1)
    expect(out.uncorrected).toBe(true)
    expect(out.notes.join(' ')).toMatch(/uncorrected/)
    expect(out.points[10]!.hp).toBe(points[10]!.hp)
  })
})
