/** The shapes of the search index: documents in, queries in, results out. Pure, no I/O. */

import { SEARCH_SORTS } from '../shared/schemas/search'

import type { Aspiration, Fuel, Use } from '../shared/domain'

export { ASPIRATIONS, FUELS, USES, type Aspiration, type Fuel, type Use } from '../shared/domain'
export const SORTS = SEARCH_SORTS

export type SearchSort = (typeof SORTS)[number]

/** The fixed rpm grid every power curve is resampled onto for band queries. */
export const CURVE_STEP_RPM = 100
export const CURVE_MIN_RPM = 1000
export const CURVE_MAX_RPM = 12000
export const CURVE_POINTS = (CURVE_MAX_RPM - CURVE_MIN_RPM) / CURVE_STEP_RPM + 1

/** A power curve on the grid: hp (SAE J1349 (2004)) at startRpm, startRpm + 100, … */
export interface SearchCurve {
  startRpm: number
  hp: number[]
}

/** One published build as the index sees it. */
export interface SearchDocument {
  id: number
  slug: string
  title: string
  summary: string
  /** One line per part: category, part and part number. */
  parts: string[]
  heads: string
  camshaft: string
  intake: string
  shop: { id: number, slug: string, name: string }
  family: string
  displacementCi: number
  /** Peaks under SAE J1349 (2004), recomputed from the headline pull; null when the build has no usable pull. */
  peakHp: number | null
  peakHpRpm: number | null
  peakTq: number | null
  peakTqRpm: number | null
  aspiration: Aspiration
  fuel: Fuel
  use: Use
  region: string
  priceCents: number
  verified: boolean
  /** Epoch milliseconds. */
  publishedAt: number
  /** What the consistency check compares with MariaDB: changes whenever the build, its shop or its pulls change. */
  stamp: string
  curve: SearchCurve | null
}

/** A validated query (see shared/schemas/search.ts for the HTTP side). */
export interface SearchQuery {
  q?: string
  ciMin?: number
  ciMax?: number
  hpMin?: number
  hpMax?: number
  hpTarget?: number
  hpTolerance?: number
  tqMin?: number
  tqMax?: number
  aspiration?: Aspiration[]
  fuel?: Fuel[]
  family?: string[]
  use?: Use[]
  region?: string[]
  verified?: boolean
  /** Whole US dollars. */
  priceMax?: number
  bandFrom?: number
  bandTo?: number
  sort?: SearchSort
  page?: number
  perPage?: number
}

export interface SearchHit {
  id: number
  slug: string
  title: string
  shop: { slug: string, name: string }
  family: string
  region: string
  use: Use
  displacementCi: number
  peakHp: number | null
  peakHpRpm: number | null
  peakTq: number | null
  peakTqRpm: number | null
  aspiration: Aspiration
  fuel: Fuel
  verified: boolean
  priceCents: number
  publishedAt: string
  /** Average power over the requested band; null when the pull does not cover the whole band. Only with a band. */
  bandAvgHp?: number | null
  /** Text relevance, only with q. */
  score?: number
}

export interface SearchFacets {
  aspiration: Record<string, number>
  fuel: Record<string, number>
  family: Record<string, number>
  region: Record<string, number>
}

export interface SearchResult {
  total: number
  page: number
  perPage: number
  hits: SearchHit[]
  facets: SearchFacets
}

/** What the index keeps of a document (the words live only in the text index). */
export type IndexedEntry = Omit<SearchHit, 'bandAvgHp' | 'score'> & { stamp: string, curve: SearchCurve | null }

/** The index's interface: the server's search service holds one, the bench and the tests build their own. */
export interface SearchIndex {
  build(docs: Iterable<SearchDocument>): void
  upsert(doc: SearchDocument): void
  remove(id: number): boolean
  query(params: SearchQuery): SearchResult
  /** Whether one indexed build is among the query's results (the same filters and words as query; order and page aside). */
  matches(id: number, params: SearchQuery): boolean
  /** What the index holds for a build: its hit fields, stamp and curve. */
  get(id: number): IndexedEntry | undefined
  /** Every indexed id with its stamp, for the consistency check. */
  stamps(): Map<number, string>
  readonly size: number
}
