import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  HP_TORQUE_CROSSOVER_RPM, bmepKpa, bmepKpaFromImperial, bmepPsi, hpFromTorque, hpPerCi, kwFromNm, nmFromKw, resample, torqueFromHp,
} from '../../../shared/engine'
import { K_5252, inventedPull, math, rel } from './helpers'

describe('hp, torque and rpm', () => {
  it('hp = lb·ft × rpm / 5252 because 1 hp = 33,000 ft·lbf/min (NIST SP 811: hp = 550 ft·lbf/s)', () => {
    expect(rel(HP_TORQUE_CROSSOVER_RPM, K_5252)).toBeLessThan(1e-15)
    expect(HP_TORQUE_CROSSOVER_RPM.toFixed(0)).toBe('5252')
  })
  it('power = torque × angular speed, cross-checked with mathjs units (400 lbf·ft at 6,000 rpm)', () => {
    const expected = math.evaluate('400 lbf * ft * 2 * pi * 6000 / minute').toNumber('hp')
    expect(rel(hpFromTorque(400, 6000), expected)).toBeLessThan(1e-9)
  })
  it('kW from N·m = T × 2π n / 60, cross-checked with mathjs units (550 N·m at 6,500 rpm)', () => {
    const expected = math.evaluate('550 N * m * 2 * pi * 6500 / minute').toNumber('kW')
    expect(rel(kwFromNm(550, 6500), expected)).toBeLessThan(1e-12)
    expect(rel(nmFromKw(kwFromNm(550, 6500), 6500), 550)).toBeLessThan(1e-12)
  })
  it('torqueFromHp undoes hpFromTorque (property)', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 5000, noNaN: true }), fc.double({ min: 100, max: 20000, noNaN: true }), (tq, rpm) =>
      Math.abs(torqueFromHp(hpFromTorque(tq, rpm), rpm) - tq) <= 1e-9 * Math.max(1, tq)))
  })
  it('hp and torque curves cross at 5252 rpm: torque is higher below, hp higher above (property)', () => {
    fc.assert(fc.property(
      fc.double({ min: 150, max: 1500, noNaN: true }), fc.double({ min: 3000, max: 7000, noNaN: true }), fc.double({ min: 0, max: 0.00004, noNaN: true }),
      (peakTq, peakTqRpm, droop) => {
        const points = inventedPull({ fromRpm: 2000, toRpm: 8000, stepRpm: 10, peakTq, peakTqRpm, droop })
        return points.filter(p => (p.lbFt as number) > 0).every(p => (p.rpm < K_5252 ? (p.lbFt as number) > p.hp : p.rpm > K_5252 ? p.hp > (p.lbFt as number) : true))
      },
    ))
    // The crossing itself, by interpolation on a resampled curve, lies within one step of 5252 rpm.
    const pts = resample(inventedPull({ fromRpm: 2000, toRpm: 8000, stepRpm: 37 }), 25)
    const i = pts.findIndex(p => p.hp >= (p.lbFt as number))
    const a = pts[i - 1]!
    const b = pts[i]!
    const da = a.hp - a.lbFt!
    const db = b.hp - b.lbFt!
    const crossing = a.rpm + ((b.rpm - a.rpm) * -da) / (db - da)
    expect(Math.abs(crossing - 5252)).toBeLessThan(25)
  })
  it('throws a RangeError on a negative rpm, and torqueFromHp on zero rpm', () => {
    expect(() => hpFromTorque(300, -1)).toThrow(RangeError)
    expect(() => torqueFromHp(300, 0)).toThrow(RangeError)
  })
})

describe('brake mean effective pressure (four-stroke)', () => {
  it('BMEP psi ≈ 150.8 × lb·ft / ci (handbook relation, from BMEP = 4π T / Vd)', () => {
    expect(bmepPsi(1, 1).toFixed(1)).toBe('150.8')
    expect(rel(bmepPsi(450, 350), (150.796 * 450) / 350)).toBeLessThan(1e-5)
  })
  it('BMEP = 4π T / Vd cross-checked with mathjs units, psi and kPa (Heywood 1988, §2.7, n_R = 2)', () => {
    expect(rel(bmepPsi(450, 350), math.evaluate('4 * pi * 450 lbf * ft / (350 cuin)').toNumber('psi'))).toBeLessThan(1e-9)
    expect(rel(bmepKpa(600, 5.7), math.evaluate('4 * pi * 600 N * m / (5.7 l)').toNumber('kPa'))).toBeLessThan(1e-12)
    expect(rel(bmepKpaFromImperial(450, 350), math.unit(bmepPsi(450, 350), 'psi').toNumber('kPa'))).toBeLessThan(1e-9)
  })
  it('BMEP kPa ≈ 12.57 × N·m / litres (handbook relation)', () => {
    expect(bmepKpa(1, 1).toFixed(2)).toBe('12.57')
  })
  it('throws a RangeError on zero or negative displacement', () => {
    expect(() => bmepPsi(400, 0)).toThrow(RangeError)
    expect(() => bmepKpa(400, -2)).toThrow(RangeError)
    expect(() => hpPerCi(400, 0)).toThrow(RangeError)
  })
})
