/**
 * Which shops have proven a target: their verified builds near it, how close those came and how
 * consistent they are. Pure, over search hits. The weights are Torquewright's own choice (see
 * README "Search"), not a trade standard.
 */
import type { Aspiration, Fuel, SearchHit, SearchIndex } from './types'

/** A build counts as near the target within these fractions of its displacement and power. */
export const NEAR_TARGET = { ci: 0.1, hp: 0.15 } as const

export interface TargetQuery {
  ci: number
  hp: number
  /** The racer's own displacement range; when given it replaces the 10 % window, never widened. */
  ciMin?: number
  ciMax?: number
  aspiration?: Aspiration
  fuel?: Fuel
  limit: number
}

export interface ShopForTarget {
  shop: { slug: string, name: string }
  region: string
  /** 0–100: closeness, consistency and the number of proven builds, weighted 45/30/25. */
  score: number
  builds: number
  /** Mean of |peak − target| / target over the near builds, in %. */
  meanDeviationPct: number
  /** Standard deviation of (peak − target) / target in %; null with a single build. */
  spreadPct: number | null
  closest: { slug: string, title: string, displacementCi: number, peakHp: number }[]
}

export interface TargetRanking {
  target: TargetQuery
  window: { ciMin: number, ciMax: number, hpMin: number, hpMax: number }
  shops: ShopForTarget[]
}

/** Ranks the shops with verified builds near the target. */
export function rankShopsForTarget(index: SearchIndex, target: TargetQuery): TargetRanking {
  const window = {
    ciMin: target.ciMin ?? target.ci * (1 - NEAR_TARGET.ci),
    ciMax: target.ciMax ?? target.ci * (1 + NEAR_TARGET.ci),
    hpMin: target.hp * (1 - NEAR_TARGET.hp),
    hpMax: target.hp * (1 + NEAR_TARGET.hp),
  }
  const { hits } = index.query({
    ...window,
    hpTarget: target.hp,
    hpTolerance: target.hp * NEAR_TARGET.hp,
    aspiration: target.aspiration ? [target.aspiration] : undefined,
    fuel: target.fuel ? [target.fuel] : undefined,
    verified: true,
    sort: 'target',
    page: 1,
    perPage: 10_000,
  })
  const byShop = new Map<string, SearchHit[]>()
  for (const hit of hits) {
    const list = byShop.get(hit.shop.slug) ?? []
    list.push(hit)
    byShop.set(hit.shop.slug, list)
  }
  const shops: ShopForTarget[] = []
  for (const list of byShop.values()) {
    const deviations = list.map(h => ((h.peakHp as number) - target.hp) / target.hp)
    const n = deviations.length
    const meanAbs = deviations.reduce((s, d) => s + Math.abs(d), 0) / n
    const mean = deviations.reduce((s, d) => s + d, 0) / n
    const spread = n > 1 ? Math.sqrt(deviations.reduce((s, d) => s + (d - mean) ** 2, 0) / (n - 1)) : null
    const closeness = Math.max(0, 1 - meanAbs / NEAR_TARGET.hp)
    const consistency = spread === null ? 0.5 : Math.max(0, 1 - spread / 0.1)
    const evidence = 1 - 1 / (1 + n)
    const first = list[0] as SearchHit
    shops.push({
      shop: { ...first.shop },
      region: first.region,
      score: Math.round(1000 * (0.45 * closeness + 0.3 * consistency + 0.25 * evidence)) / 10,
      builds: n,
      meanDeviationPct: Math.round(meanAbs * 1000) / 10,
      spreadPct: spread === null ? null : Math.round(spread * 1000) / 10,
      closest: list.slice(0, 3).map(h => ({ slug: h.slug, title: h.title, displacementCi: h.displacementCi, peakHp: h.peakHp as number })),
    })
  }
  shops.sort((a, b) => b.score - a.score || b.builds - a.builds || a.shop.slug.localeCompare(b.shop.slug))
  return { target, window, shops: shops.slice(0, target.limit) }
}
