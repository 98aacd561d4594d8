import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { airflowCfm, ccMinToLbHr, fuelDefaults, injectorSizeLbHr, lbHrToCcMin } from '../../../shared/engine'
import { math, rel } from './helpers'

describe('injector sizing', () => {
  it('lb/hr = hp × BSFC / (injectors × duty) — 500 hp, 0.50, 8 injectors at 80 % (common practice)', () => {
    expect(rel(injectorSizeLbHr({ hp: 500, bsfc: 0.5, injectors: 8, maxDutyCycle: 0.8 }), (500 * 0.5) / (8 * 0.8))).toBeLessThan(1e-12)
  })
  it('lb/hr → cc/min agrees with mathjs units (lb/hour → g/minute) over the fuel density', () => {
    const expected = math.unit(39.0625, 'lb/hour').toNumber('g/minute') / 0.74
    expect(rel(lbHrToCcMin(39.0625, 0.74), expected)).toBeLessThan(1e-12)
    expect(rel(ccMinToLbHr(lbHrToCcMin(39.0625, 0.74), 0.74), 39.0625)).toBeLessThan(1e-12)
  })
  it('for gasoline, cc/min ≈ 10.5 × lb/hr (common practice rule of thumb)', () => {
    expect(Math.abs(lbHrToCcMin(1, 0.72) - 10.5)).toBeLessThan(0.1)
  })
  it('needs more injector for E85 and methanol than for pump gas at the same power (common practice BSFC table)', () => {
    const size = (bsfc: number): number => injectorSizeLbHr({ hp: 600, bsfc, injectors: 8, maxDutyCycle: 0.85 })
    expect(size(fuelDefaults.e85.bsfcNa)).toBeGreaterThan(size(fuelDefaults.pump_gas.bsfcNa) * 1.3)
    expect(size(fuelDefaults.methanol.bsfcNa)).toBeGreaterThan(size(fuelDefaults.pump_gas.bsfcNa) * 1.8)
    for (const f of Object.values(fuelDefaults)) expect(f.bsfcBoosted).toBeGreaterThan(f.bsfcNa)
  })
  it('bigger injectors are never needed for fewer hp (property)', () => {
    fc.assert(fc.property(fc.double({ min: 50, max: 3000, noNaN: true }), fc.double({ min: 1, max: 500, noNaN: true }), (hp, more) =>
      injectorSizeLbHr({ hp: hp + more, bsfc: 0.5, injectors: 8, maxDutyCycle: 0.8 }) > injectorSizeLbHr({ hp, bsfc: 0.5, injectors: 8, maxDutyCycle: 0.8 })))
  })
  it('throws a RangeError on a duty cycle given in percent, zero injectors or negative power', () => {
    expect(() => injectorSizeLbHr({ hp: 500, bsfc: 0.5, injectors: 8, maxDutyCycle: 80 })).toThrow(/fraction/)
    expect(() => injectorSizeLbHr({ hp: 500, bsfc: 0.5, injectors: 0, maxDutyCycle: 0.8 })).toThrow(RangeError)
    expect(() => injectorSizeLbHr({ hp: -500, bsfc: 0.5, injectors: 8, maxDutyCycle: 0.8 })).toThrow(RangeError)
  })
})

describe('airflow', () => {
  it('CFM = ci × rpm × VE / 3456 for a four-stroke (handbook relation), cross-checked with mathjs units', () => {
    const expected = math.evaluate('350 cuin * 6000 / minute / 2 * 0.9').toNumber('ft^3/minute')
    expect(rel(airflowCfm(350, 6000, 0.9), expected)).toBeLessThan(1e-12)
  })
  it('throws a RangeError on VE given in percent or zero rpm', () => {
    expect(() => airflowCfm(350, 6000, 90)).toThrow(RangeError)
    expect(() => airflowCfm(350, 0, 0.9)).toThrow(RangeError)
  })
})
