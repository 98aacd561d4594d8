import fc from 'fast-check'
import { quantileSeq } from 'mathjs'
import { describe, expect, it } from 'vitest'
import { bandGain, deltaAt, quantile, quartiles, summarizeSwaps, SWAP_GRID_STEP, SWAP_MIN_RUN_SAMPLE, type SwapSample } from '../../shared/swaps/stats'
import { SWAP_CHANGES } from '../../shared/schemas/swaps'
import { changeKinds } from '../../server/database/schema'
import { demoBuilds } from '../../scripts/lib/demo-data'
import { demoSwapBuilds } from '../../scripts/lib/seed-swaps'

const values = fc.array(fc.double({ min: -500, max: 500, noNaN: true }), { minLength: 1, maxLength: 40 })

describe('quantiles (Hyndman & Fan definition 7: R\'s default, numpy "linear")', () => {
  it('agree with the reference library mathjs quantileSeq, which interpolates the same way', () => {
    fc.assert(fc.property(values, fc.integer({ min: 0, max: 1000 }).map(n => n / 1000), (xs, p) => {
      const sorted = [...xs].sort((a, b) => a - b)
      expect(quantile(sorted, p)).toBeCloseTo(quantileSeq(xs, p) as number, 9)
    }))
  })

  it('give R\'s textbook answer for 1..10: quantile(1:10) is 1, 3.25, 5.5, 7.75, 10 (R documentation, type 7)', () => {
    expect(quartiles([10, 9, 8, 7, 6, 5, 4, 3, 2, 1])).toEqual({ n: 10, min: 1, q1: 3.25, median: 5.5, q3: 7.75, max: 10 })
  })

  it('refuse no values and a p outside 0..1', () => {
    expect(() => quantile([], 0.5)).toThrow(RangeError)
    expect(() => quantile([1], 1.5)).toThrow(RangeError)
    expect(quartiles([])).toBeNull()
  })
})

/** Brute force: linear interpolation by hand between the two neighbouring points. */
function lerpAt(points: SwapSample['points'], rpm: number): number | null {
  for (let i = 0; i + 1 < points.length; i++) {
    const a = points[i]!
    const b = points[i + 1]!
    if (rpm >= a.rpm && rpm <= b.rpm) return a.hpDelta + ((b.hpDelta - a.hpDelta) * (rpm - a.rpm)) / (b.rpm - a.rpm)
  }
  return null
}

const sample = fc.record({
  start: fc.integer({ min: 20, max: 40 }).map(n => n * 100),
  length: fc.integer({ min: 8, max: 50 }),
  deltas: fc.array(fc.double({ min: -60, max: 80, noNaN: true }), { minLength: 50, maxLength: 50 }),
  peak: fc.double({ min: -20, max: 60, noNaN: true }),
}).map(({ start, length, deltas, peak }, i = 0): SwapSample => ({
  slug: `s-${start}-${length}-${i}`, title: 't', ci: 400, aspiration: 'na', fuel: 'e85', changeNote: null, peakGainHp: peak,
  points: deltas.slice(0, length).map((d, k) => ({ rpm: start + k * 100, hpDelta: d })),
}))

describe('the swap statistics against a brute-force computation', () => {
  it('the median curve and its quartiles at every grid rpm are those of the comparisons covering it', () => {
    fc.assert(fc.property(fc.array(sample, { minLength: 1, maxLength: 12 }), fc.option(fc.record({ from: fc.integer({ min: 20, max: 60 }), width: fc.integer({ min: 5, max: 40 }) })), (samples, b) => {
      const band = b ? { from: b.from * 100, to: b.from * 100 + b.width * 100 } : null
      const stats = summarizeSwaps(samples, band)
      expect(stats.count).toBe(samples.length)
      for (const point of stats.curve) {
        const at = samples.map(s => lerpAt(s.points, point.rpm)).filter((d): d is number => d !== null)
        expect(point.n).toBe(at.length)
        expect(point.median).toBeCloseTo(quantileSeq(at, 0.5) as number, 6)
        expect(point.q1).toBeCloseTo(quantileSeq(at, 0.25) as number, 6)
        expect(point.q3).toBeCloseTo(quantileSeq(at, 0.75) as number, 6)
      }
      // Every grid rpm some comparison covers is on the curve, and the grid keeps its step.
      for (const p of stats.curve) if (band) expect(p.rpm >= band.from && p.rpm <= band.to).toBe(true)
      if (band) expect(stats.grid).toEqual({ from: band.from, to: band.to, step: SWAP_GRID_STEP })
      const peaks = samples.map(s => s.peakGainHp)
      expect(stats.peakGain!.median).toBeCloseTo(quantileSeq(peaks, 0.5) as number, 6)
      expect(stats.peakGain!.q1).toBeCloseTo(quantileSeq(peaks, 0.25) as number, 6)
    }), { numRuns: 60 })
  })

  it('a band-average gain is the mean of the delta curve over the covered band (1 rpm steps by hand), and none below half cover', () => {
    fc.assert(fc.property(sample, fc.integer({ min: 20, max: 60 }), fc.integer({ min: 3, max: 30 }), (s, f, w) => {
      const from = f * 100
      const to = from + w * 100
      const lo = Math.max(from, s.points[0]!.rpm)
      const hi = Math.min(to, s.points[s.points.length - 1]!.rpm)
      const got = bandGain(s.points, from, to)
      if (hi <= lo || hi - lo < 0.5 * (to - from)) {
        expect(got).toBeNull()
        return
      }
      let sum = 0
      let n = 0
      for (let rpm = lo; rpm < hi; rpm += 1) {
        sum += (lerpAt(s.points, rpm)! + lerpAt(s.points, rpm + 1)!) / 2
        n++
      }
      expect(got).toBeCloseTo(sum / n, 6)
    }), { numRuns: 200 })
  })

  it('calls a stretch "helps" where three in four gained and "costs" where three in four lost, given enough comparisons', () => {
    const rising = (k: number): SwapSample => ({
      slug: `r${k}`, title: 't', ci: 400, aspiration: 'na', fuel: 'e85', changeNote: null, peakGainHp: 10 + k,
      // Loses below 4,500 rpm, gains above it.
      points: [3000, 4000, 4500, 5000, 6000, 7000].map(rpm => ({ rpm, hpDelta: ((rpm - 4500) / 100) + k })),
    })
    const stats = summarizeSwaps([0, 0.5, 1, 1.5].map(rising), { from: 3000, to: 7000 })
    const helps = stats.runs.find(r => r.kind === 'helps')!
    const costs = stats.runs.find(r => r.kind === 'costs')!
    expect(costs.fromRpm).toBe(3000)
    expect(costs.toRpm).toBe(4250)
    expect(helps.fromRpm).toBe(4500)
    expect(helps.toRpm).toBe(7000)
    // Too few comparisons: no verdict at all.
    expect(summarizeSwaps([0, 1].map(rising).slice(0, SWAP_MIN_RUN_SAMPLE - 1), null).runs).toEqual([])
    expect(deltaAt(rising(0).points, 8000)).toBeNull()
  })
})

describe('the kinds of change', () => {
  it('the swap route asks about exactly the kinds a comparison can record', () => {
    expect([...SWAP_CHANGES]).toEqual([...changeKinds])
  })
})

describe('the seeded swap comparisons', () => {
  const swaps = demoSwapBuilds(demoBuilds())
  it('are at least 30 verified before/after pairs across at least three kinds of change, each a build of its own', () => {
    expect(swaps.length).toBeGreaterThanOrEqual(30)
    const kinds = new Map<string, number>()
    for (const b of swaps) {
      expect(b.pulls.map(p => p.comparisonRole).sort()).toEqual(['baseline', 'variant'])
      expect(b.pulls.every(p => p.status === 'verified')).toBe(true)
      const variant = b.pulls.find(p => p.comparisonRole === 'variant')!
      kinds.set(variant.changeKind!, (kinds.get(variant.changeKind!) ?? 0) + 1)
    }
    expect(kinds.size).toBeGreaterThanOrEqual(3)
    for (const n of kinds.values()) expect(n).toBeGreaterThanOrEqual(10)
    expect(new Set([...demoBuilds(), ...swaps].map(b => b.slug)).size).toBe(demoBuilds().length + swaps.length)
  })
})
