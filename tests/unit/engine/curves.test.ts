import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { averagePower, deltaCurve, describeDelta, peaks, powerBandRpm, resample, rpmGrid } from '../../../shared/engine'
import type { PullPoint } from '../../../shared/engine'
import { K_5252, inventedPull, rel } from './helpers'

/** Invented curve whose hp is a parabola: P − c (rpm − rp)². */
const parabola = (P: number, c: number, rp: number, from = 3000, to = 8000, step = 10): PullPoint[] => {
  const out: PullPoint[] = []
  for (let rpm = from; rpm <= to; rpm += step) out.push({ rpm, hp: P - c * (rpm - rp) ** 2 })
  return out
}

/** fast-check curves: increasing rpm with positive hp. */
const curveArb = fc.tuple(
  fc.integer({ min: 1000, max: 4000 }),
  fc.array(fc.tuple(fc.double({ min: 1, max: 300, noNaN: true }), fc.double({ min: 1, max: 1500, noNaN: true })), { minLength: 2, maxLength: 60 }),
).map(([start, steps]) => {
  let rpm = start
  return steps.map(([dr, hp]) => {
    rpm += dr
    return { rpm, hp, lbFt: (hp * K_5252) / rpm }
  })
})

describe('resample', () => {
  it('linear interpolation reproduces a straight torque line exactly, on multiples of the step inside the data (no extrapolation)', () => {
    const line = [3017, 3333, 4100, 5555, 6992].map(rpm => ({ rpm, lbFt: 0.02 * rpm + 300, hp: ((0.02 * rpm + 300) * rpm) / K_5252 }))
    const out = resample(line, 100)
    expect(out[0]!.rpm).toBe(3100)
    expect(out[out.length - 1]!.rpm).toBe(6900)
    for (const p of out) {
      expect(p.rpm % 100).toBe(0)
      expect(p.lbFt).toBeCloseTo(0.02 * p.rpm + 300, 9)
    }
  })
  it('each resampled torque lies between the two data points around it, and hp = lb·ft × rpm / 5252.113 at every point (33,000 ft·lbf/min per hp, 2π rad per rev; property)', () => {
    fc.assert(fc.property(curveArb, fc.integer({ min: 5, max: 250 }), (curve, step) => {
      const out = resample(curve, step)
      return out.every((p) => {
        const i = curve.findIndex(q => q.rpm >= p.rpm)
        const b = curve[i]!
        const a = curve[Math.max(0, i - 1)]!
        return p.rpm >= curve[0]!.rpm && p.rpm <= curve[curve.length - 1]!.rpm
          && p.lbFt! >= Math.min(a.lbFt!, b.lbFt!) - 1e-9 && p.lbFt! <= Math.max(a.lbFt!, b.lbFt!) + 1e-9
          && rel(p.hp, (p.lbFt! * p.rpm) / 5252.113) < 1e-6
      })
    }))
  })
  it('keeps hp and torque in step between samples: at a 1,000 rpm step, hp from the resampled torque, not interpolated apart (hp = lb·ft × rpm / 5252.113)', () => {
    const coarse = inventedPull({ fromRpm: 3000, toRpm: 7000, stepRpm: 1000 })
    const out = resample(coarse, 250)
    const mid = out.find(p => p.rpm === 3500)!
    const tq = (coarse[0]!.lbFt! + coarse[1]!.lbFt!) / 2
    expect(mid.lbFt).toBeCloseTo(tq, 9)
    expect(mid.hp).toBeCloseTo((tq * 3500) / 5252.113, 3)
    // Interpolating hp separately would have given a figure about 1 hp away.
    const separate = (coarse[0]!.hp + coarse[1]!.hp) / 2
    expect(Math.abs(mid.hp - separate)).toBeGreaterThan(0.5)
  })
  it('grid points stay inside the range even when the division rounds (property; regression for a step of 499.99999999999943)', () => {
    expect(rpmGrid(0, 4999.999999999994, 499.99999999999943).every(r => r <= 4999.999999999994)).toBe(true)
    fc.assert(fc.property(fc.double({ min: 0, max: 20000, noNaN: true }), fc.double({ min: 0, max: 5000, noNaN: true }), fc.double({ min: 1, max: 500, noNaN: true }), (a, w, step) =>
      rpmGrid(a, a + w, step).every(r => r >= a && r <= a + w)), { numRuns: 1000 })
  }, 30_000)
  it('throws a RangeError when rpm is not increasing, or on a zero step', () => {
    expect(() => resample([{ rpm: 4000, hp: 300 }, { rpm: 3900, hp: 310 }], 100)).toThrow(RangeError)
    expect(() => resample(inventedPull(), 0)).toThrow(RangeError)
  })
})

describe('peaks', () => {
  it('peak hp of an invented parabolic torque curve sits where d(rpm × tq)/drpm = 0 (calculus, worked in the test)', () => {
    const T0 = 450
    const k = 0.00002
    const r0 = 4800
    // 3k r² − 4k r0 r + (k r0² − T0) = 0
    const expectedRpm = (4 * k * r0 + Math.sqrt(16 * k * k * r0 * r0 - 12 * k * (k * r0 * r0 - T0))) / (6 * k)
    const expectedHp = (expectedRpm * (T0 - k * (expectedRpm - r0) ** 2)) / K_5252
    const p = peaks(inventedPull({ fromRpm: 3000, toRpm: 7500, stepRpm: 5, peakTq: T0, peakTqRpm: r0, droop: k }))
    expect(Math.abs(p.peakHpRpm - expectedRpm)).toBeLessThanOrEqual(5)
    expect(rel(p.peakHp, expectedHp)).toBeLessThan(1e-5)
    expect(p.peakTq).toBeCloseTo(T0, 9)
    expect(p.peakTqRpm).toBe(r0)
  })
  it('computes torque from hp when a point carries no torque', () => {
    const p = peaks([{ rpm: 3000, hp: 200 }, { rpm: 4000, hp: 300 }, { rpm: 5000, hp: 320 }])
    expect(p.peakTq).toBeCloseTo((300 * K_5252) / 4000, 9)
    expect(p.peakTqRpm).toBe(4000)
  })
})

describe('averagePower (trapezoid rule)', () => {
  it('equals the exact integral mean of a straight line, including a band that starts between samples', () => {
    const line = [3000, 3500, 4000, 4500, 5000, 5500, 6000].map(rpm => ({ rpm, hp: 0.1 * rpm }))
    expect(averagePower(line, 3250, 5800)).toBeCloseTo((0.1 * (3250 + 5800)) / 2, 9)
  })
  it('matches the analytic mean of an invented cubic hp curve to 1e-5 (calculus, worked in the test)', () => {
    const T0 = 450
    const k = 0.00002
    const r0 = 4800
    const F = (r: number): number => (T0 * r * r / 2 - k * (r ** 4 / 4 - (2 * r0 * r ** 3) / 3 + (r0 * r0 * r * r) / 2)) / K_5252
    const a = 4000
    const b = 6500
    const exact = (F(b) - F(a)) / (b - a)
    expect(rel(averagePower(inventedPull({ stepRpm: 10 }), a, b), exact)).toBeLessThan(1e-5)
  })
  it('clips the band to the data and throws a RangeError when the band lies outside it', () => {
    const pts = inventedPull({ fromRpm: 3000, toRpm: 7000 })
    expect(averagePower(pts, 1000, 9000)).toBeCloseTo(averagePower(pts, 3000, 7000), 9)
    expect(() => averagePower(pts, 7500, 8000)).toThrow(RangeError)
    expect(() => averagePower(pts, 5000, 4000)).toThrow(RangeError)
  })
  it('the average over a band lies between the band\'s minimum and maximum (property)', () => {
    fc.assert(fc.property(curveArb, fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (curve, u, v) => {
      const lo = curve[0]!.rpm
      const hi = curve[curve.length - 1]!.rpm
      const a = lo + Math.min(u, v) * (hi - lo)
      const b = lo + Math.max(u, v) * (hi - lo)
      if (b - a < 1e-6) return true
      const inside = curve.filter(p => p.rpm > a && p.rpm < b).map(p => p.hp)
      const at = (r: number): number => {
        const i = curve.findIndex(p => p.rpm >= r)
        const q = curve[i]!
        const pPrev = curve[Math.max(0, i - 1)]!
        return q.rpm === pPrev.rpm ? q.hp : pPrev.hp + ((q.hp - pPrev.hp) * (r - pPrev.rpm)) / (q.rpm - pPrev.rpm)
      }
      const values = [...inside, at(a), at(b)]
      const avg = averagePower(curve, a, b)
      return avg >= Math.min(...values) - 1e-9 && avg <= Math.max(...values) + 1e-9
    }))
  })
})

describe('powerBandRpm', () => {
  it('on an invented parabolic hp curve the 90 % band is rp ± √(0.1 P / c) (algebra, worked in the test)', () => {
    const P = 600
    const c = 0.0001
    const rp = 6200
    const half = Math.sqrt((0.1 * P) / c)
    const band = powerBandRpm(parabola(P, c, rp), 0.9)
    expect(Math.abs(band.fromRpm - (rp - half))).toBeLessThan(0.5)
    expect(Math.abs(band.toRpm - (rp + half))).toBeLessThan(0.5)
    expect(band.widthRpm).toBeCloseTo(band.toRpm - band.fromRpm, 9)
    expect(band.reachesStart || band.reachesEnd).toBe(false)
  })
  it('says when the band runs into the end of the pull', () => {
    const band = powerBandRpm(parabola(600, 0.0001, 7900, 3000, 8000), 0.95)
    expect(band.reachesEnd).toBe(true)
    expect(band.toRpm).toBe(8000)
  })
  it('throws a RangeError on a fraction outside (0, 1]', () => {
    expect(() => powerBandRpm(inventedPull(), 1.2)).toThrow(RangeError)
    expect(() => powerBandRpm(inventedPull(), 0)).toThrow(RangeError)
  })
})

describe('deltaCurve and describeDelta', () => {
  const baseline = inventedPull({ fromRpm: 3000, toRpm: 7000, stepRpm: 50 })
  // Invented variant: 6 hp down below 4,000 rpm, level to 5,000, 15 hp up above it.
  const variant = inventedPull({ fromRpm: 3000, toRpm: 7000, stepRpm: 100 }).map((p) => {
    const d = p.rpm < 4000 ? -6 : p.rpm > 5000 ? 15 : 0
    return { rpm: p.rpm, hp: p.hp + d }
  })
  const { points, summary } = deltaCurve(baseline, variant, { stepRpm: 100, evenHp: 2 })

  it('works on a common grid even when the pulls were sampled differently', () => {
    expect(points[0]!.rpm).toBe(3000)
    expect(points[points.length - 1]!.rpm).toBe(7000)
    expect(points.find(p => p.rpm === 6000)!.hpDelta).toBeCloseTo(15, 6)
    expect(points.find(p => p.rpm === 3500)!.hpDelta).toBeCloseTo(-6, 6)
  })
  it('summarises where the variant gained and lost and by how much', () => {
    expect(summary.maxGainHp).toBeCloseTo(15, 6)
    expect(summary.maxLossHp).toBeCloseTo(6, 6)
    expect(summary.regions.map(r => r.kind)).toEqual(['loss', 'even', 'gain'])
    const gain = summary.regions[2]!
    expect(gain.fromRpm).toBe(5050)
    expect(gain.toRpm).toBe(7000)
    const expectedAverage = (-6 * (3950 - 3000) + 15 * (7000 - 5050)) / 4000
    expect(Math.abs(summary.averageDeltaHp - expectedAverage)).toBeLessThan(0.2)
    // A torque change follows the power change: Δtq = Δhp × 5252.11 / rpm.
    expect(points.find(p => p.rpm === 6000)!.tqDelta).toBeCloseTo((15 * K_5252) / 6000, 6)
  })
  it('describes it in plain words', () => {
    const text = describeDelta(summary)
    expect(text).toMatch(/gained from 5,050 to 7,000 rpm \(up to 15\.0 hp/)
    expect(text).toMatch(/lost from 3,000 to 3,950 rpm \(up to 6\.0 hp/)
    expect(text).toMatch(/more\.$/)
    expect(text.split('. ').length).toBeLessThanOrEqual(2)
  })
  it('identical pulls are even everywhere and say so', () => {
    const same = deltaCurve(baseline, baseline)
    expect(same.summary.regions).toHaveLength(1)
    expect(same.summary.regions[0]!.kind).toBe('even')
    expect(same.summary.averageDeltaHp).toBeCloseTo(0, 9)
    expect(describeDelta(same.summary)).toMatch(/matches the baseline/)
  })
  it('throws a RangeError when the pulls share no rpm range', () => {
    expect(() => deltaCurve(inventedPull({ fromRpm: 2000, toRpm: 3000 }), inventedPull({ fromRpm: 4000, toRpm: 5000 }))).toThrow(RangeError)
  })
})
