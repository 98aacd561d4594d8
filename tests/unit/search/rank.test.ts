import { describe, expect, it } from 'vitest'
import { createSearchIndex, type SearchDocument } from '../../../search/index'
import { NEAR_TARGET, rankShopsForTarget } from '../../../search/rank'
import { syntheticDocuments } from '../../../search/synthetic'

/** Invented builds of three shops around 427 ci and 700 hp: one close and consistent, one close but scattered, one off target. */
function fixture(): SearchDocument[] {
  const base = syntheticDocuments(1, { seed: 5, shops: 8 })[0]!
  const shopRow = (id: number, name: string) => ({ id, slug: name.toLowerCase().replace(/\s+/g, '-'), name })
  const make = (id: number, shop: ReturnType<typeof shopRow>, ci: number, hp: number, verified = true): SearchDocument => ({
    ...base, id, slug: `b-${id}`, title: `Build ${id}`, shop, displacementCi: ci, peakHp: hp, aspiration: 'na', fuel: 'race_gas', verified, stamp: String(id),
  })
  const steady = shopRow(1, 'Steady Hands Machine')
  const scattered = shopRow(2, 'Scattershot Speed')
  const far = shopRow(3, 'Far Off Engines')
  return [
    make(1, steady, 427, 702), make(2, steady, 430, 698), make(3, steady, 425, 705),
    make(4, scattered, 427, 640), make(5, scattered, 428, 790), make(6, scattered, 426, 700),
    make(7, far, 427, 560), make(8, far, 600, 700), make(9, far, 427, 701, false),
  ]
}

describe('shops ranked for a target', () => {
  const index = createSearchIndex()
  index.build(fixture())
  const ranking = rankShopsForTarget(index, { ci: 427, hp: 700, aspiration: 'na', limit: 5 })

  it('puts the close, consistent shop first and the scattered one after it', () => {
    expect(ranking.shops.map(s => s.shop.slug)).toEqual(['steady-hands-machine', 'scattershot-speed'])
    const [steady, scattered] = ranking.shops
    expect(steady!.score).toBeGreaterThan(scattered!.score)
    expect(steady!.builds).toBe(3)
    expect(steady!.spreadPct!).toBeLessThan(scattered!.spreadPct!)
  })

  it('counts only verified builds inside the window (10 % of the displacement, 15 % of the power)', () => {
    expect(NEAR_TARGET).toEqual({ ci: 0.1, hp: 0.15 })
    // Far Off Engines has one build 20 % low, one 40 % over the displacement and one unverified: none count.
    expect(ranking.shops.some(s => s.shop.slug === 'far-off-engines')).toBe(false)
    expect(ranking.window.hpMin).toBeCloseTo(595, 6)
    expect(ranking.window.ciMax).toBeCloseTo(469.7, 6)
  })

  it('reports the mean deviation and spread in percent of the target', () => {
    const steady = ranking.shops[0]!
    const deviations = [2 / 700, -2 / 700, 5 / 700]
    expect(steady.meanDeviationPct).toBeCloseTo((100 * (2 + 2 + 5)) / 700 / 3, 1)
    const mean = deviations.reduce((a, b) => a + b, 0) / 3
    const sd = Math.sqrt(deviations.reduce((a, d) => a + (d - mean) ** 2, 0) / 2)
    expect(steady.spreadPct).toBeCloseTo(100 * sd, 1)
    expect(steady.closest.map(c => c.slug)).toEqual(['b-1', 'b-2', 'b-3'])
  })

  it('honours the limit and filters by fuel', () => {
    expect(rankShopsForTarget(index, { ci: 427, hp: 700, limit: 1 }).shops).toHaveLength(1)
    expect(rankShopsForTarget(index, { ci: 427, hp: 700, fuel: 'e85', limit: 5 }).shops).toEqual([])
  })

  it('keeps the racer\'s own displacement range instead of widening it', () => {
    // 427 ± 10 % would take in 425–430 ci; the racer asked for 426–428 ci only.
    const kept = rankShopsForTarget(index, { ci: 427, ciMin: 426, ciMax: 428, hp: 700, aspiration: 'na', limit: 5 })
    expect(kept.window.ciMin).toBe(426)
    expect(kept.window.ciMax).toBe(428)
    const shown = kept.shops.flatMap(s => s.closest.map(c => c.displacementCi))
    expect(shown.length).toBeGreaterThan(0)
    for (const ci of shown) expect(ci).toBeGreaterThanOrEqual(426)
    for (const ci of shown) expect(ci).toBeLessThanOrEqual(428)
    // Build 2 (430 ci) and build 3 (425 ci) of the steady shop fall outside the racer's range.
    expect(kept.shops.find(s => s.shop.slug === 'steady-hands-machine')!.builds).toBe(1)
  })
})
