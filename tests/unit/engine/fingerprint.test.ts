import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { FINGERPRINT_TOLERANCE, convertCurve, curveFingerprint, fingerprintDistance, resample, sameCurve } from '../../../shared/engine'
import type { PullPoint, Weather } from '../../../shared/engine'
import { inventedPull } from './helpers'

// All curves are invented. "Raw" stands for a logger's file: a fine, uneven-looking step and a little noise.
const raw = inventedPull({ fromRpm: 2987, toRpm: 7013, stepRpm: 3.7, noise: 0.003, seed: 21 })
const weather: Weather = { baroInHg: 29.05, airTempF: 84, humidityPct: 45 }

describe('curveFingerprint', () => {
  const f = curveFingerprint(raw)

  it('is a short string', () => {
    expect(typeof f).toBe('string')
    expect(f.length).toBeLessThan(64)
  })
  it('the same curve resampled at 50 and at 100 rpm steps matches', () => {
    expect(sameCurve(f, curveFingerprint(resample(raw, 50)))).toBe(true)
    expect(sameCurve(f, curveFingerprint(resample(raw, 100)))).toBe(true)
    expect(sameCurve(curveFingerprint(resample(raw, 50)), curveFingerprint(resample(raw, 100)))).toBe(true)
  })
  it('the same curve corrected under another standard (and resampled) matches', () => {
    const din = convertCurve(raw, { standard: 'UNCORRECTED', weather }, { standard: 'DIN_70020', weather }).points
    const j607 = convertCurve(resample(raw, 100), { standard: 'SAE_J1349_2004', weather }, { standard: 'SAE_J607', weather }).points
    expect(sameCurve(f, curveFingerprint(din))).toBe(true)
    expect(sameCurve(f, curveFingerprint(j607))).toBe(true)
  })
  it('a trimmed copy of the same pull still matches', () => {
    expect(sameCurve(f, curveFingerprint(raw.filter(p => p.rpm > 3600 && p.rpm < 6600)))).toBe(true)
  })
  it('a different curve does not match: torque peak 300 rpm later', () => {
    const other = inventedPull({ fromRpm: 3000, toRpm: 7000, stepRpm: 10, peakTqRpm: 5100, noise: 0.003, seed: 4 })
    expect(sameCurve(f, curveFingerprint(other))).toBe(false)
  })
  it('a different curve does not match: a 20 lb·ft gain around 5,500 rpm (an invented intake swap)', () => {
    const swapped: PullPoint[] = raw.map((p) => {
      const lbFt = p.lbFt! + 20 * Math.exp(-(((p.rpm - 5500) / 400) ** 2))
      return { rpm: p.rpm, lbFt, hp: (p.hp * lbFt) / p.lbFt! }
    })
    expect(fingerprintDistance(f, curveFingerprint(swapped))).toBeGreaterThan(FINGERPRINT_TOLERANCE)
  })
  it('a scaled copy always matches, at any correction factor from 0.8 to 1.2 (property)', () => {
    const base = resample(raw, 20)
    const fb = curveFingerprint(base)
    fc.assert(fc.property(fc.double({ min: 0.8, max: 1.2, noNaN: true }), k =>
      sameCurve(fb, curveFingerprint(base.map(p => ({ rpm: p.rpm, hp: p.hp * k })))),
    ), { numRuns: 50 })
  })
  it('curves with no rpm range in common, and malformed fingerprints, are infinitely far apart', () => {
    const low = curveFingerprint(inventedPull({ fromRpm: 2000, toRpm: 3500 }))
    const high = curveFingerprint(inventedPull({ fromRpm: 5000, toRpm: 7500 }))
    expect(fingerprintDistance(low, high)).toBe(Number.POSITIVE_INFINITY)
    expect(fingerprintDistance(f, 'nonsense')).toBe(Number.POSITIVE_INFINITY)
    expect(fingerprintDistance(f, 'f1.c.A')).toBe(Number.POSITIVE_INFINITY)
    expect(sameCurve(f, '')).toBe(false)
  })
  it('throws a RangeError on a curve whose rpm is not increasing', () => {
    expect(() => curveFingerprint([{ rpm: 5000, hp: 400 }, { rpm: 4000, hp: 380 }])).toThrow(RangeError)
  })
})
