// The values the search filters take, apart from the zod schemas (shared/schemas/search.ts) so the
// search page's store reads them without bringing zod to the browser.
export const SEARCH_ASPIRATIONS = ['na', 'turbo', 'supercharged', 'nitrous'] as const
export const SEARCH_FUELS = ['pump_gas', 'race_gas', 'e85', 'methanol'] as const
export const SEARCH_USES = ['drag', 'road_course', 'street_strip', 'off_road', 'marine', 'street'] as const
export const SEARCH_SORTS = ['relevance', 'target', 'band', 'newest', 'price'] as const
/** The rpm range band queries may ask about (the index's curve grid). */
export const BAND_RPM = { min: 1000, max: 12000 } as const
