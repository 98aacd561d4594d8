import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  CC_PER_CI, MM_PER_IN, NM_PER_LBFT, PA_PER_INHG, W_PER_HP, W_PER_PS,
  ccToCi, cToF, ciToCc, fToC, hpToKw, hpToPs, inHgToKpa, inHgToMbar, kpaToInHg, kwToHp, lbFtToNm, mbarToInHg, nmToLbFt, psToHp,
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

  it('1 inHg (32 °F) = 3.38638E+03 Pa (NIST SP 811 B.8)', () => {
    expect(Math.abs(PA_PER_INHG - 3386.38)).toBeLessThan(0.5 + 1e-9)
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
  it('°F → °C agrees with mathjs (degF, degC)', () => {
    for (const f of [-20, 32, 60, 77, 100]) expect(fToC(f)).toBeCloseTo(math.unit(f, 'degF').toNumber('degC'), 9)
  })
})

describe('round trips (property)', () => {
  const value = fc.double({ min: -1e6, max: 1e6, noNaN: true })
  it('hp ↔ kW, lb·ft ↔ N·m, hp ↔ PS, in³ ↔ cm³, inHg ↔ kPa ↔ mbar return their input', () => {
    fc.assert(fc.property(value, (x) => {
      const close = (y: number): boolean => Math.abs(y - x) <= 1e-9 * Math.max(1, Math.abs(x))
      return close(kwToHp(hpToKw(x))) && close(nmToLbFt(lbFtToNm(x))) && close(psToHp(hpToPs(x)))
        && close(ccToCi(ciToCc(x))) && close(kpaToInHg(inHgToKpa(x))) && close(mbarToInHg(inHgToMbar(x))) && close(cToF(fToC(x)))
    }))
  })
  it('rejects a non-finite input with a RangeError', () => {
    expect(() => hpToKw(Number.NaN)).toThrow(RangeError)
    expect(() => lbFtToNm(Number.POSITIVE_INFINITY)).toThrow(RangeError)
  })
})
