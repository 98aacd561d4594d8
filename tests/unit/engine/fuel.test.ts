import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { GASOLINE_BSFC, GASOLINE_STOICH_AFR, airflowCfm, ccMinToLbHr, fuelDefaults, injectorSizeLbHr, lbHrToCcMin } from '../../../shared/engine'
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
  it('the "10.5 cc/min per lb/h" rule of thumb for gasoline (common practice) holds at 0.72 g/cm³; at the 0.74 g/cm³ used for pump gas it is 10.22 (453.59237 g/lb, NIST SP 811)', () => {
    expect(lbHrToCcMin(1, 0.72)).toBeCloseTo(453.59237 / 60 / 0.72, 12)
    expect(lbHrToCcMin(1, 0.72).toFixed(2)).toBe('10.50')
    expect(lbHrToCcMin(1, fuelDefaults.pump_gas.densityGPerCc).toFixed(2)).toBe('10.22')
    expect(lbHrToCcMin(1, fuelDefaults.race_gas.densityGPerCc).toFixed(2)).toBe('10.50')
  })
  it('needs more injector for E85 and methanol than for pump gas at the same power', () => {
    const size = (bsfc: number): number => injectorSizeLbHr({ hp: 600, bsfc, injectors: 8, maxDutyCycle: 0.85 })
    expect(size(fuelDefaults.e85.bsfcNa)).toBeGreaterThan(size(fuelDefaults.pump_gas.bsfcNa) * 1.45)
    expect(size(fuelDefaults.methanol.bsfcNa)).toBeGreaterThan(size(fuelDefaults.pump_gas.bsfcNa) * 2.25)
    for (const f of Object.values(fuelDefaults)) expect(f.bsfcBoosted).toBeGreaterThan(f.bsfcNa)
  })
  it('a duty-cycle refusal speaks plainly (no 5e-324 in the message)', () => {
    expect(() => injectorSizeLbHr({ hp: 500, bsfc: 0.5, injectors: 8, maxDutyCycle: 0 })).toThrow(/maxDutyCycle must be greater than 0 and at most 1/)
    expect(() => injectorSizeLbHr({ hp: 500, bsfc: 0.5, injectors: 8, maxDutyCycle: 0 })).not.toThrow(/e-324/)
  })
})

describe('fuel defaults follow the stoichiometric air-fuel ratios', () => {
  // Combustion equations (any combustion text; Heywood 1988 §3.3 sets them out): CH₃OH + 1.5 O₂ → CO₂ + 2 H₂O,
  // C₂H₅OH + 3 O₂ → 2 CO₂ + 3 H₂O. Atomic weights C 12.011, H 1.008, O 15.999 (IUPAC standard atomic weights);
  // dry air 28.965 g/mol with 20.95 % O₂ by volume (U.S. Standard Atmosphere 1976).
  const airPerMolO2 = 28.965 / 0.2095
  const methanol = (1.5 * airPerMolO2) / (12.011 + 4 * 1.008 + 15.999)
  const ethanol = (3 * airPerMolO2) / (2 * 12.011 + 6 * 1.008 + 15.999)

  it('methanol 6.4–6.5 and ethanol 9.0 from the combustion equations; E85 (85 % ethanol, 15 % gasoline by volume) about 9.8 by mass', () => {
    expect(methanol).toBeCloseTo(6.47, 2)
    expect(ethanol).toBeCloseTo(9.0, 1)
    // Mass shares from densities: ethanol 0.789 g/cm³ (CRC Handbook, from memory) and the module's gasoline 0.74.
    const ethanolMass = 0.85 * 0.789
    const gasolineMass = 0.15 * fuelDefaults.pump_gas.densityGPerCc
    const e85 = (ethanolMass * ethanol + gasolineMass * GASOLINE_STOICH_AFR) / (ethanolMass + gasolineMass)
    expect(Math.abs(e85 - fuelDefaults.e85.stoichAfr)).toBeLessThan(0.05)
    expect(Math.abs(methanol - fuelDefaults.methanol.stoichAfr)).toBeLessThan(0.1)
  })
  it('BSFC defaults = gasoline\'s (0.50 NA, 0.60 with an adder: common practice) × 14.7 / (A/F)s: E85 ×1.5, methanol ×2.3, rounded up', () => {
    expect(GASOLINE_BSFC).toEqual({ na: 0.5, boosted: 0.6 })
    // Gasoline's stoichiometric air-fuel ratio 14.7 (Heywood 1988, as cited in shared/engine/fuel.ts).
    expect(GASOLINE_STOICH_AFR).toBe(14.7)
    for (const f of Object.values(fuelDefaults)) {
      const ratio = 14.7 / f.stoichAfr
      expect(f.fuelRatio).toBeCloseTo(ratio, 12)
      expect(f.bsfcNa).toBeGreaterThanOrEqual(0.5 * ratio - 1e-9)
      expect(f.bsfcNa - 0.5 * ratio).toBeLessThan(0.01)
      expect(f.bsfcBoosted).toBeGreaterThanOrEqual(0.6 * ratio - 1e-9)
      expect(f.bsfcBoosted - 0.6 * ratio).toBeLessThan(0.01)
    }
    expect(fuelDefaults.e85.fuelRatio).toBeCloseTo(1.5, 1)
    expect(fuelDefaults.e85.bsfcNa).toBe(0.75)
    expect(fuelDefaults.e85.bsfcBoosted).toBe(0.9)
    // 14.7 / 6.4 = 2.297: methanol needs 2.3 × the fuel of gasoline.
    expect(fuelDefaults.methanol.bsfcNa).toBe(1.15)
    expect(fuelDefaults.methanol.bsfcBoosted).toBe(1.38)
  })
  it('methanol injectors sized from the defaults are at least 2.29 × the gasoline ones, never the 2.0 × of a flat table', () => {
    const size = (bsfc: number): number => injectorSizeLbHr({ hp: 800, bsfc, injectors: 8, maxDutyCycle: 0.8 })
    expect(size(fuelDefaults.methanol.bsfcNa) / size(fuelDefaults.pump_gas.bsfcNa)).toBeGreaterThanOrEqual(2.29)
    expect(size(fuelDefaults.methanol.bsfcBoosted) / size(fuelDefaults.pump_gas.bsfcBoosted)).toBeGreaterThanOrEqual(2.29)
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
