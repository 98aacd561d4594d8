/**
 * The domain's words: the lists a build, a deal request and a search filter choose from, the words
 * people read for them, the account roles and the correction standards. The database schema, the zod
 * schemas, the display helpers and the search store all take them from here.
 */
import type { Aspiration, Fuel } from './engine/types'

export const ROLES = ['racer', 'builder', 'admin'] as const
export type Role = (typeof ROLES)[number]

// The engine module (pure, imports only its own folder) computes with the standards, aspirations and
// fuels, so those lists are written there and given out from here.
export { ASPIRATIONS, CORRECTION_STANDARD_IDS, CORRECTION_STANDARDS, FUELS, type Aspiration, type CorrectionStandard, type Fuel } from './engine/types'

export const USES = ['drag', 'road_course', 'street_strip', 'off_road', 'marine', 'street'] as const
export type Use = (typeof USES)[number]

// Keyed by any string so a page can look up a stored value as it comes; `satisfies` keeps every word covered.
export const ASPIRATION_LABELS: Record<string, string> = {
  na: 'Naturally aspirated', turbo: 'Turbocharged', supercharged: 'Supercharged', nitrous: 'Nitrous',
} satisfies Record<Aspiration, string>

export const FUEL_LABELS: Record<string, string> = {
  pump_gas: 'Pump gas', race_gas: 'Race gas', e85: 'E85', methanol: 'Methanol',
} satisfies Record<Fuel, string>

export const USE_LABELS: Record<string, string> = {
  drag: 'Drag', road_course: 'Road course', street_strip: 'Street/strip', off_road: 'Off-road', marine: 'Marine', street: 'Street',
} satisfies Record<Use, string>
