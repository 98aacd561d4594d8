/** The unit systems a viewer can choose. Kept apart from the zod schemas so the browser's entry can read it without zod. */
export const UNIT_SYSTEMS = ['imperial', 'metric'] as const
export type UnitSystem = typeof UNIT_SYSTEMS[number]
