import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  CC_PER_CI, M3_PER_FT3, MM_PER_IN, NM_PER_LBFT, PA_PER_INHG, PA_PER_PSI, W_PER_HP, W_PER_PS,
  bsfcToImperial, bsfcToMetric, ccToCi, cfmToM3Min, cToF, ciToCc, fToC, ftMinToMs, hpToKw, hpToPs, inHgToKpa, inHgToMbar, kgHrToLbHr,
  kpaToInHg, kpaToPsi, kwToHp, lbFtToNm, lbHrToKgHr, m3MinToCfm, mbarToInHg, msToFtMin, nmToLbFt, psToHp, psiToKpa,
} from '../../../shared/engine'
import { math, rel } from './helpers'

// Definitions from NIST SP 811 (2008) Appendix B.8, written out here independently of the module.
const FT = 0.3048
const LB = 0.45359237
const G0 = 9.80665
const LBF = LB * G0

describe('unit factors (NIST SP 811)', () => {
  it('1 hp = 7.456999E+02 W, i.e. 1 hp = 0.7456999 kW (NIST SP 811 B.8)', () => {
    expect(Math.abs(hpToKw(1) - 0.7456999)).toBeLessThan(5e-8)
  })

  it('1 hp is exactly 550 ft·lbf/s from the definitions of ft, lb and standard gravity (NIST SP 811 B.8)', () => {
    expect(rel(W_PER_HP, 550 * FT * LBF)).toBeLessThan(1e-15)
  })

  it('1 lbf·ft = 1.355818 N·m (NIST SP 811 B.8), exactly 0.3048 m × 4.4482216152605 N', () => {
    expect(Math.abs(lbFtToNm(1) - 1.355818)).toBeLessThan(5e-7)
    expect(rel(NM_PER_LBFT, FT * LBF)).toBeLessThan(1e-15)
  })

  it('1 in = 25.4 mm and 1 in³ = 16.387064 cm³ exactly (NIST SP 811 B.8)', () => {
    expect(MM_PER_IN).toBe(25.4)
    expect(rel(CC_PER_CI, 2.54 ** 3)).toBeLessThan(1e-15)
  })

  it('1 inHg (conventional) = 3.386389E+03 Pa (NIST SP 811 B.8); the 32 °F inch, 3.38638E+03 Pa in the same table, is 0.0003 % away', () => {
    expect(PA_PER_INHG).toBe(3386.389)
    expect(Math.abs(PA_PER_INHG - 3386.38) / 3386.38).toBeLessThan(3e-6)
    expect(Math.abs(inHgToKpa(29.92) - 29.92 * 3.38638)).toBeLessThan(0.001)
  })

  it('1 PS (metric horsepower) = 75 kgf·m/s = 735.49875 W exactly (NIST SP 811 B.8)', () => {
    expect(rel(W_PER_PS, 75 * G0)).toBeLessThan(1e-15)
    expect(Math.abs(psToHp(1) - 0.98632)).toBeLessThan(5e-6)
  })

  it('°F ↔ °C: t/°C = (t/°F − 32)/1.8 (NIST SP 811 B.8)', () => {
    expect(fToC(212)).toBeCloseTo(100, 12)
    expect(fToC(32)).toBeCloseTo(0, 12)
    expect(cToF(-40)).toBeCloseTo(-40, 12)
  })
})

describe('pressure, speed, airflow and fuel-flow factors (NIST SP 811)', () => {
  // The tabulated NIST figures below are quoted from memory of Appendix B.8; each is also derived
  // exactly from the definitions of ft, lb and standard gravity above.
  it('1 psi = 6.894757E+03 Pa (NIST SP 811 B.8), exactly 1 lbf / (0.0254 m)²', () => {
    expect(Math.abs(psiToKpa(1) - 6.894757)).toBeLessThan(5e-7)
    expect(rel(PA_PER_PSI, LBF / (0.0254 ** 2))).toBeLessThan(1e-15)
  })
  it('1 ft/min = 5.08E-03 m/s exactly (NIST SP 811 B.8)', () => {
    expect(ftMinToMs(1)).toBeCloseTo(0.00508, 15)
  })
  it('1 ft³/min = 4.719474E-04 m³/s (NIST SP 811 B.8), exactly 0.3048³ m³ per minute', () => {
    expect(Math.abs(cfmToM3Min(1) / 60 - 4.719474e-4)).toBeLessThan(5e-11)
    expect(rel(M3_PER_FT3, FT ** 3)).toBeLessThan(1e-15)
  })
  it('1 lb/h = 1.259979E-04 kg/s (NIST SP 811 B.8)', () => {
    expect(Math.abs(lbHrToKgHr(1) / 3600 - 1.259979e-4)).toBeLessThan(5e-11)
  })
  it('1 lb/(hp·h) = 1.689659E-07 kg/J (NIST SP 811 B.8), i.e. about 608.28 g/(kW·h)', () => {
    expect(Math.abs(bsfcToMetric(1) / 3.6e9 - 1.689659e-7)).toBeLessThan(5e-14)
    expect(rel(bsfcToMetric(1), (LB * 1000) / ((550 * FT * LBF) / 1000))).toBeLessThan(1e-15)
  })
})

describe('cross-checks against mathjs units (general-purpose reference library)', () => {
  it('hp → W agrees with mathjs to 1e-9', () => {
    expect(rel(hpToKw(1) * 1000, math.unit(1, 'hp').toNumber('W'))).toBeLessThan(1e-9)
  })
  it('lbf·ft → N·m agrees with mathjs', () => {
    expect(rel(lbFtToNm(400), math.evaluate('400 lbf * ft').toNumber('N m'))).toBeLessThan(1e-12)
  })
  it('in³ → cm³ agrees with mathjs (cuin, cc)', () => {
    expect(rel(ciToCc(350), math.unit(350, 'cuin').toNumber('cc'))).toBeLessThan(1e-12)
  })
  it('inHg → kPa agrees with mathjs (25.4 mmHg, mathjs mmHg = 133.322 Pa) within its rounding', () => {
    expect(rel(inHgToKpa(29.92), math.unit(29.92, 'inHg').toNumber('kPa'))).toBeLessThan(1e-5)
  })
  it('psi, ft/min, ft³/min, lb/h and lb/(hp·h) agree with mathjs', () => {
    expect(rel(psiToKpa(95), math.unit(95, 'psi').toNumber('kPa'))).toBeLessThan(1e-9)
    expect(rel(ftMinToMs(4000), math.evaluate('4000 ft/minute').toNumber('m/s'))).toBeLessThan(1e-12)
    expect(rel(cfmToM3Min(650), math.evaluate('650 cuft/minute').toNumber('m^3/minute'))).toBeLessThan(1e-12)
    expect(rel(lbHrToKgHr(300), math.evaluate('300 lbm/hour').toNumber('kg/hour'))).toBeLessThan(1e-12)
    expect(rel(bsfcToMetric(0.5), math.evaluate('0.5 lbm/(hp*hour)').toNumber('g/(kW*hour)'))).toBeLessThan(1e-9)
  })
  it('°F → °C agrees with mathjs (degF, degC)', () => {
    for (const f of [-20, 32, 60, 77, 100]) expect(fToC(f)).toBeCloseTo(math.unit(f, 'degF').toNumber('degC'), 9)
  })
})

describe('round trips (property)', () => {
  const value = fc.double({ min: -1e6, max: 1e6, noNaN: true })
  it('hp ↔ kW, lb·ft ↔ N·m, hp ↔ PS, in³ ↔ cm³, inHg ↔ kPa ↔ mbar, psi, ft/min, ft³/min, lb/h and BSFC round trips return their input', () => {
    fc.assert(fc.property(value, (x) => {
      const close = (y: number): boolean => Math.abs(y - x) <= 1e-9 * Math.max(1, Math.abs(x))
      return close(kwToHp(hpToKw(x))) && close(nmToLbFt(lbFtToNm(x))) && close(psToHp(hpToPs(x)))
        && close(ccToCi(ciToCc(x))) && close(kpaToInHg(inHgToKpa(x))) && close(mbarToInHg(inHgToMbar(x))) && close(cToF(fToC(x)))
        && close(kpaToPsi(psiToKpa(x))) && close(msToFtMin(ftMinToMs(x))) && close(m3MinToCfm(cfmToM3Min(x)))
        && close(kgHrToLbHr(lbHrToKgHr(x))) && close(bsfcToImperial(bsfcToMetric(x)))
    }))
  })
  it('rejects a non-finite input with a RangeError', () => {
    expect(() => hpToKw(Number.NaN)).toThrow(RangeError)
    expect(() => lbFtToNm(Number.POSITIVE_INFINITY)).toThrow(RangeError)
  })
})
