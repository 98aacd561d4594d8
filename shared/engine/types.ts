/** Shared shapes of the engine-math module: pull points, weather, standards, parse and evidence results. */

/** One sample of a dyno pull: rpm with power in hp and, where known, torque in lb·ft. */
export interface PullPoint {
  rpm: number
  hp: number
  lbFt?: number
}

/** Weather at the dyno: barometer (total pressure) in inHg, air temperature in °F, relative humidity in %. */
export interface Weather {
  baroInHg: number
  airTempF: number
  humidityPct: number
}

/** The atmospheric correction standards Torquewright can compute, as a typed tuple: what `z.enum` takes. */
export const CORRECTION_STANDARD_IDS = ['UNCORRECTED', 'SAE_J1349_2004', 'SAE_J1349_1990', 'SAE_J607', 'DIN_70020', 'ISO_1585'] as const
export type CorrectionStandard = (typeof CORRECTION_STANDARD_IDS)[number]

const STANDARD_LABELS: Record<CorrectionStandard, string> = {
  UNCORRECTED: 'Uncorrected (as observed)',
  SAE_J1349_2004: 'SAE J1349 (2004)',
  SAE_J1349_1990: 'SAE J1349 (1990)',
  SAE_J607: 'SAE J607 (60 °F, 29.92 inHg dry)',
  DIN_70020: 'DIN 70020 (20 °C, 1013 mbar)',
  ISO_1585: 'ISO 1585 / ECE R85',
}

/** The standards with labels in our own words, in the tuple's order. */
export const CORRECTION_STANDARDS: readonly { id: CorrectionStandard, label: string }[] = CORRECTION_STANDARD_IDS.map(id => ({ id, label: STANDARD_LABELS[id] }))

/** A standard together with the weather it was applied under; no weather means no correction (factor 1). */
export interface CorrectionSpec {
  standard: CorrectionStandard
  weather?: Weather | null
}

/** Where the engine's air comes from, which sets what BMEP is plausible (also a build's and a request's field, shared/domain.ts). */
export const ASPIRATIONS = ['na', 'turbo', 'supercharged', 'nitrous'] as const
export type Aspiration = (typeof ASPIRATIONS)[number]

/** The fuels the fuel-system calculator knows (also a build's and a request's field, shared/domain.ts). */
export const FUELS = ['pump_gas', 'race_gas', 'e85', 'methanol'] as const
export type Fuel = (typeof FUELS)[number]
/** Keys of the fuels the fuel-system calculator knows. */
export type FuelKey = Fuel

export type TorqueUnit = 'lbft' | 'nm'
export type PowerUnit = 'hp' | 'kw' | 'ps'

/** What parsePull found in the header. */
export interface ParseColumns {
  rpm: { header: string, index: number }
  torque: { header: string, index: number, unit: TorqueUnit } | null
  power: { header: string, index: number, unit: PowerUnit } | null
  delimiter: ',' | ';' | '\t'
  decimalComma: boolean
}

export interface ParseError {
  /** 1-based row of the file (the header is row 1); 0 for a problem with the file as a whole. */
  row: number
  message: string
}

export type ParseResult
  = | { ok: true, points: PullPoint[], columns: ParseColumns, warnings: string[] }
    | { ok: false, errors: ParseError[] }

export type EvidenceOutcome = 'pass' | 'warn' | 'fail'

export type EvidenceCheckId
  = | 'rpm-order'
    | 'rpm-spacing'
    | 'power-torque-agreement'
    | 'declared-peaks'
    | 'correction-factor'
    | 'bmep'
    | 'piston-speed'
    | 'duplicate-curve'

/** One line of the admin's evidence report. */
export interface EvidenceCheck {
  id: EvidenceCheckId
  outcome: EvidenceOutcome
  message: string
  figures: Record<string, number>
}

/** What the shop declared alongside a pull. */
export interface DeclaredFigures {
  standard: CorrectionStandard
  correctionFactor?: number | null
  peakHp?: number | null
  peakHpRpm?: number | null
  peakTq?: number | null
  peakTqRpm?: number | null
}

/** A pull as submitted: its points, the shop's declared figures and the weather. */
export interface EvidencePull {
  points: PullPoint[]
  declared: DeclaredFigures
  weather?: Weather | null
  /** Which columns the file really carried (from parsePull); without it every point with lbFt is compared. */
  columns?: Pick<ParseColumns, 'torque' | 'power'> | null
}

/** The build the pull belongs to. */
export interface EvidenceContext {
  aspiration: Aspiration
  displacementCi: number
  strokeIn: number
  /** The build this pull is attached to, so its own fingerprints are not reported as duplicates. */
  buildId?: string | number | null
  fingerprintsOfOtherBuilds?: { buildId: string | number, fingerprint: string }[]
}
