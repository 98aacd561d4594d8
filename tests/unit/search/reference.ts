/**
 * A brute-force reference for the index's filter queries: plain array filtering and sorting over
 * the same documents, written from the rules of GET /api/search rather than from the index's code.
 */
import { averagePower } from '../../../shared/engine/curves'
import type { SearchDocument, SearchFacets, SearchQuery } from '../../../search/index'
import { ASPIRATIONS, FUELS } from '../../../search/index'
import { seededRandom } from '../../../shared/random'

export function referenceFilter(docs: SearchDocument[], q: SearchQuery): SearchDocument[] {
  const tolerance = q.hpTolerance ?? (q.hpTarget === undefined ? 0 : 0.1 * q.hpTarget)
  return docs.filter((d) => {
    const hp = d.peakHp
    const tq = d.peakTq
    if (q.ciMin !== undefined && d.displacementCi < q.ciMin) return false
    if (q.ciMax !== undefined && d.displacementCi > q.ciMax) return false
    if ((q.hpMin !== undefined || q.hpMax !== undefined) && hp === null) return false
    if (q.hpMin !== undefined && (hp as number) < q.hpMin) return false
    if (q.hpMax !== undefined && (hp as number) > q.hpMax) return false
    if (q.hpTarget !== undefined && (hp === null || Math.abs(hp - q.hpTarget) > tolerance)) return false
    if ((q.tqMin !== undefined || q.tqMax !== undefined) && tq === null) return false
    if (q.tqMin !== undefined && (tq as number) < q.tqMin) return false
    if (q.tqMax !== undefined && (tq as number) > q.tqMax) return false
    if (q.aspiration?.length && !q.aspiration.includes(d.aspiration)) return false
    if (q.fuel?.length && !q.fuel.includes(d.fuel)) return false
    if (q.use?.length && !q.use.includes(d.use)) return false
    if (q.family?.length && !q.family.includes(d.family)) return false
    if (q.region?.length && !q.region.includes(d.region)) return false
    if (q.verified && !d.verified) return false
    if (q.priceMax !== undefined && d.priceCents > q.priceMax * 100) return false
    return true
  })
}

/** Average power over the band by the engine module (trapezoid rule); null when the curve does not cover it. */
export function referenceBand(d: SearchDocument, from: number, to: number): number | null {
  const c = d.curve
  if (!c || c.hp.length < 2) return null
  const last = c.startRpm + (c.hp.length - 1) * 100
  if (from < c.startRpm || to > last) return null
  return averagePower(c.hp.map((hp, k) => ({ rpm: c.startRpm + k * 100, hp })), from, to)
}

/** The reference order: the sort's key, then id ascending. */
export function referenceSort(docs: SearchDocument[], q: SearchQuery): SearchDocument[] {
  const key = (d: SearchDocument): number => {
    switch (q.sort) {
      case 'price': return d.priceCents
      case 'target': return Math.abs((d.peakHp as number) - (q.hpTarget as number))
      case 'band': {
        const avg = referenceBand(d, q.bandFrom as number, q.bandTo as number)
        return avg === null ? Infinity : -avg
      }
      default: return -d.publishedAt
    }
  }
  return [...docs].map(d => ({ d, k: key(d) })).sort((a, b) => (a.k < b.k ? -1 : a.k > b.k ? 1 : a.d.id - b.d.id)).map(x => x.d)
}

export function referenceFacets(docs: SearchDocument[]): Pick<SearchFacets, 'aspiration' | 'fuel'> & { family: Map<string, number>, region: Map<string, number> } {
  const aspiration = Object.fromEntries(ASPIRATIONS.map(a => [a, docs.filter(d => d.aspiration === a).length]))
  const fuel = Object.fromEntries(FUELS.map(f => [f, docs.filter(d => d.fuel === f).length]))
  const family = new Map<string, number>()
  const region = new Map<string, number>()
  for (const d of docs) {
    family.set(d.family, (family.get(d.family) ?? 0) + 1)
    region.set(d.region, (region.get(d.region) ?? 0) + 1)
  }
  return { aspiration, fuel, family, region }
}

/** A fixed, seeded set of filter-only queries over the documents' own values. */
export function seededFilterQueries(docs: SearchDocument[], count: number, seed = 99): SearchQuery[] {
  const r = seededRandom(seed)
  const families = [...new Set(docs.map(d => d.family))]
  const regions = [...new Set(docs.map(d => d.region))]
  const sorts = ['newest', 'price', 'target', undefined] as const
  const out: SearchQuery[] = []
  for (let i = 0; i < count; i++) {
    const q: SearchQuery = {}
    if (r.next() < 0.6) {
      const lo = r.int(200, 500)
      q.ciMin = lo
      q.ciMax = lo + r.int(10, 200)
    }
    if (r.next() < 0.3) q.hpMin = r.int(200, 900)
    if (r.next() < 0.2) q.hpMax = (q.hpMin ?? 0) + r.int(100, 800)
    if (r.next() < 0.2) q.tqMin = r.int(200, 700)
    if (r.next() < 0.4) q.aspiration = [r.pick(ASPIRATIONS), ...(r.next() < 0.4 ? [r.pick(ASPIRATIONS)] : [])]
    if (r.next() < 0.3) q.fuel = [r.pick(FUELS)]
    if (r.next() < 0.25) q.family = [r.pick(families), ...(r.next() < 0.3 ? [r.pick(families)] : [])]
    if (r.next() < 0.1) q.region = [r.pick(regions)]
    if (r.next() < 0.2) q.use = [r.pick(['drag', 'marine', 'street'] as const)]
    if (r.next() < 0.3) q.verified = true
    if (r.next() < 0.25) q.priceMax = r.int(20, 120) * 1000
    q.sort = r.pick(sorts)
    if (q.sort === 'target' || r.next() < 0.1) {
      q.hpTarget = r.int(300, 1500)
      if (r.next() < 0.5) q.hpTolerance = r.int(10, 200)
    }
    q.perPage = r.pick([10, 24, 100])
    q.page = r.int(1, 3)
    out.push(q)
  }
  return out
}
