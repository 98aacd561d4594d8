// The values the search filters take, apart from the zod schemas (shared/schemas/search.ts) so the
// search page's store reads them without bringing zod to the browser.
export const SEARCH_SORTS = ['relevance', 'target', 'band', 'newest', 'price'] as const
/** The rpm range band queries may ask about (the index's curve grid). */
export const BAND_RPM = { min: 1000, max: 12000 } as const
