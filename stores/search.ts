import { defineStore } from 'pinia'
import type { LocationQuery, LocationQueryRaw } from 'vue-router'
import { ASPIRATIONS, FUELS, USES } from '#shared/domain'
import { BAND_RPM, SEARCH_SORTS } from '#shared/search/values'

/** The filters of the search page; the URL holds the same names as GET /api/search. */
export interface SearchFilters {
  q: string
  ciMin: number | null
  ciMax: number | null
  hpTarget: number | null
  hpTolerance: number | null
  aspiration: string[]
  fuel: string[]
  family: string[]
  region: string[]
  use: string[]
  verified: boolean
  priceMax: number | null
  sort: string
  page: number
}

/** The racer's band: launch or converter stall speed up to shift rpm. */
export interface RacerBand {
  from: number | null
  to: number | null
}

const BAND_KEY = 'torquewright.band'
const NUMBERS = ['ciMin', 'ciMax', 'hpTarget', 'hpTolerance', 'priceMax'] as const
const LISTS = { aspiration: ASPIRATIONS, fuel: FUELS, use: USES, family: null, region: null } as const

const blank = (): SearchFilters => ({
  q: '', ciMin: null, ciMax: null, hpTarget: null, hpTolerance: null,
  aspiration: [], fuel: [], family: [], region: [], use: [], verified: false, priceMax: null, sort: '', page: 1,
})

type QueryValue = LocationQuery[string] | undefined
const first = (v: QueryValue) => (Array.isArray(v) ? v[0] : v) ?? null
const many = (v: QueryValue) => (Array.isArray(v) ? v : v === undefined || v === null ? [] : [v]).filter((x): x is string => typeof x === 'string' && x !== '')
function numberOf(v: QueryValue): number | null {
  const s = first(v)
  if (s === null || s === '') return null
  const n = Number(s)
  return Number.isFinite(n) && n >= 0 ? n : null
}
const bandValid = (b: RacerBand) => b.from !== null && b.to !== null && b.from >= BAND_RPM.min && b.to <= BAND_RPM.max && b.to - b.from >= 100

export const useSearchStore = defineStore('search', () => {
  const filters = reactive<SearchFilters>(blank())
  const band = reactive<RacerBand>({ from: null, to: null })

  /** Reads the filters (and a band, if the link carries one) from a route's query; values the API would refuse are dropped. */
  function fromQuery(query: LocationQuery): void {
    const next = blank()
    next.q = String(first(query.q) ?? '').slice(0, 200)
    for (const key of NUMBERS) next[key] = numberOf(query[key])
    for (const [key, allowed] of Object.entries(LISTS) as [keyof typeof LISTS, readonly string[] | null][]) {
      next[key] = [...new Set(many(query[key]).filter(v => !allowed || allowed.includes(v)))]
    }
    next.verified = first(query.verified) === 'true'
    const sort = String(first(query.sort) ?? '')
    next.sort = (SEARCH_SORTS as readonly string[]).includes(sort) ? sort : ''
    next.page = Math.max(1, Math.min(400, Math.floor(numberOf(query.page) ?? 1)))
    Object.assign(filters, next)
    const from = numberOf(query.bandFrom)
    const to = numberOf(query.bandTo)
    if (from !== null && to !== null) setBand({ from, to })
  }

  /** The band as query parameters, when it is complete and within the grid. */
  const bandQuery = computed(() => (bandValid(band) ? { bandFrom: band.from as number, bandTo: band.to as number } : {}))

  /** The filters as URL and API query: only what is set, lists as repeated parameters. */
  const query = computed<LocationQueryRaw>(() => {
    const out: LocationQueryRaw = {}
    if (filters.q.trim()) out.q = filters.q
    for (const key of NUMBERS) if (filters[key] !== null) out[key] = String(filters[key])
    if (filters.hpTarget === null) delete out.hpTolerance
    for (const key of Object.keys(LISTS) as (keyof typeof LISTS)[]) if (filters[key].length) out[key] = [...filters[key]]
    if (filters.verified) out.verified = 'true'
    let sort = filters.sort
    if (sort === 'target' && filters.hpTarget === null) sort = ''
    if (sort === 'band' && !bandValid(band)) sort = ''
    if (sort) out.sort = sort
    if (filters.page > 1) out.page = String(filters.page)
    const b = bandQuery.value
    if ('bandFrom' in b) Object.assign(out, { bandFrom: String(b.bandFrom), bandTo: String(b.bandTo) })
    return out
  })

  /** Sets the racer's band and keeps it in this browser for the next visit. */
  function setBand(next: RacerBand): void {
    band.from = next.from
    band.to = next.to
    if (import.meta.client) {
      if (bandValid(band)) localStorage.setItem(BAND_KEY, JSON.stringify({ from: band.from, to: band.to }))
      else if (next.from === null && next.to === null) localStorage.removeItem(BAND_KEY)
    }
  }

  /** The band this browser kept from an earlier visit, if any and none is set yet. */
  function restoreBand(): boolean {
    if (!import.meta.client || bandValid(band)) return false
    try {
      const kept = JSON.parse(localStorage.getItem(BAND_KEY) ?? 'null') as RacerBand | null
      if (kept && bandValid(kept)) {
        band.from = kept.from
        band.to = kept.to
        return true
      }
    }
    catch {
      localStorage.removeItem(BAND_KEY)
    }
    return false
  }

  /** Changes some filters; any change but the page itself goes back to the first page. */
  function update(patch: Partial<SearchFilters>): void {
    Object.assign(filters, patch)
    if (!('page' in patch)) filters.page = 1
  }

  /** Adds or removes one value of a repeatable filter. */
  function toggle(key: 'aspiration' | 'fuel' | 'family' | 'region' | 'use', value: string): void {
    const list = filters[key]
    update({ [key]: list.includes(value) ? list.filter(v => v !== value) : [...list, value] })
  }

  function reset(): void {
    Object.assign(filters, blank())
  }

  return { filters, band, query, bandQuery, bandValid: computed(() => bandValid(band)), fromQuery, setBand, restoreBand, update, toggle, reset }
})
