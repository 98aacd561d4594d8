import type { SearchFilterParams } from '../schemas/search'

/** One saved search as its owner sees it (GET /api/me/searches and the answers of the writes). */
export interface SavedSearchView {
  id: number
  name: string
  query: SearchFilterParams
  /** The search page opened on these filters. */
  link: string
  emailOn: boolean
  /** How many published builds match now. */
  matches: number
  createdAt: string
  lastNotifiedAt: string | null
}

export interface SavedSearchList {
  searches: SavedSearchView[]
  /** How many one account may keep. */
  max: number
}
