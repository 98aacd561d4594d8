import { describe, expect, it } from 'vitest'
import { savedSearchCreate, savedSearchPatch } from '../../../shared/schemas/saved-search'
import { searchFilters, searchQuery, type SearchFilterParams } from '../../../shared/schemas/search'
import { canonicalFilters, describeFilters, filterParams, hasFilters, searchPath } from '../../../shared/search/saved'

/** What the search page's URL parser hands the route: repeated names become lists. */
function queryOf(path: string): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {}
  for (const [k, v] of new URL(path, 'http://x').searchParams) {
    const seen = out[k]
    out[k] = seen === undefined ? v : [...(Array.isArray(seen) ? seen : [seen]), v]
  }
  return out
}

const samples: SearchFilterParams[] = [
  { q: 'billet crank', ciMin: 400, ciMax: 440, aspiration: ['turbo', 'na'], verified: true },
  { hpTarget: 800, hpTolerance: 50, fuel: ['e85'], use: ['drag', 'street_strip'], priceMax: 40000 },
  { family: ['Pushrod V8, small block'], region: ['Red Mesa'], tqMin: 500, bandFrom: 4000, bandTo: 6500 },
]

describe('saved-search filters', () => {
  it.each(samples.map(s => [JSON.stringify(s), s] as const))('go to a /search link and back to the same stored filters: %s', (_name, f) => {
    const path = searchPath(f)
    expect(path.startsWith('/search?')).toBe(true)
    const back = searchQuery.parse(queryOf(path))
    const { sort: _s, page: _p, perPage: _pp, ...filters } = back
    expect(canonicalFilters(filters)).toEqual(canonicalFilters(f))
  })

  it('stores one spelling: keys in order, lists sorted once each, blank words and verified=false dropped', () => {
    const a = canonicalFilters({ verified: false, q: '  ', aspiration: ['turbo', 'na', 'turbo'], ciMin: 300 })
    expect(a).toEqual({ aspiration: ['na', 'turbo'], ciMin: 300 })
    expect(Object.keys(canonicalFilters({ q: 'x', ciMin: 1, aspiration: ['na'] }))).toEqual(['aspiration', 'ciMin', 'q'])
  })

  it('reads a stored (validated) query again unchanged through the search schema', () => {
    for (const f of samples) expect(canonicalFilters(searchFilters.parse(f))).toEqual(canonicalFilters(f))
  })

  it('needs words or a filter; a band alone is not one', () => {
    expect(hasFilters({ bandFrom: 4000, bandTo: 6000 })).toBe(false)
    expect(hasFilters({ q: '   ' })).toBe(false)
    expect(hasFilters({ verified: true })).toBe(true)
    expect(hasFilters({ fuel: ['e85'] })).toBe(true)
    expect(savedSearchCreate.safeParse({ name: 'Band', query: { bandFrom: 4000, bandTo: 6000 } }).success).toBe(false)
    expect(savedSearchCreate.safeParse({ name: 'Sorted', query: { ciMin: 1, sort: 'price' } }).success).toBe(false)
    expect(savedSearchPatch.safeParse({}).success).toBe(false)
  })

  it('suggests a short name from the filters', () => {
    expect(describeFilters({ ciMin: 300, aspiration: ['supercharged'] })).toBe('300+ ci · supercharged')
    expect(describeFilters({ q: 'billet', hpTarget: 800, fuel: ['e85'], verified: true })).toBe('“billet” · 800 hp ± 80 · E85 · verified')
    expect(describeFilters({ ciMax: 350, priceMax: 25000 })).toBe('up to 350 ci · up to $25,000')
    expect(describeFilters({ q: 'x'.repeat(120) }).length).toBe(80)
  })

  it('writes lists as repeated parameters', () => {
    expect(filterParams({ aspiration: ['turbo', 'na'], verified: true })).toEqual({ aspiration: ['na', 'turbo'], verified: 'true' })
  })
})
