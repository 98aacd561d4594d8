/** The shapes the build editor's routes answer with (the owner's view of a build). */
import type { EvidenceCheck, ParseError } from '../engine/types'
import type { PullSummaryFigures } from '../pulls/summary'
import type { BuildPartRow, BuildPhotoRow } from './builds'

export type BuildStatus = 'draft' | 'published' | 'archived'

/** Every editable field, null where the shop has not filled it in yet. */
export interface EditorFields {
  title: string
  summary: string | null
  engineFamily: string | null
  cylinders: number | null
  boreIn: number | null
  strokeIn: number | null
  rodLengthIn: number | null
  cylinderHeads: string | null
  chamberCc: number | null
  pistonCc: number | null
  gasketBoreIn: number | null
  gasketThicknessIn: number | null
  deckClearanceIn: number | null
  camIntakeDurationDeg: number | null
  camExhaustDurationDeg: number | null
  camIntakeLiftIn: number | null
  camExhaustLiftIn: number | null
  camLobeSeparationDeg: number | null
  camIntakeCenterlineDeg: number | null
  intakeManifold: string | null
  throttleBody: string | null
  injectorSizeLbHr: number | null
  injectorCount: number | null
  fuel: 'pump_gas' | 'race_gas' | 'e85' | 'methanol' | null
  aspiration: 'na' | 'turbo' | 'supercharged' | 'nitrous' | null
  engineManagement: string | null
  intendedUse: 'drag' | 'road_course' | 'street_strip' | 'off_road' | 'marine' | 'street' | null
  priceCents: number | null
}

/** One pull as its owner sees it: the check report and the reviewer's note included. */
export interface EditorPull {
  id: number
  label: string
  status: 'submitted' | 'verified' | 'rejected'
  dynoKind: 'engine' | 'chassis'
  declaredStandard: string
  comparisonRole: 'baseline' | 'variant' | null
  changeKind: string | null
  changeNote: string | null
  summary: PullSummaryFigures
  checks: EvidenceCheck[]
  reviewNote: string | null
  hasSheet: boolean
  createdAt: string
}

/** What publishing still needs, by field, in the words the publish check uses. */
export interface PublishIssue {
  path: string
  message: string
}

export interface EditorBuild {
  id: number
  slug: string
  status: BuildStatus
  publishedAt: string | null
  verified: boolean
  updatedAt: string
  fields: EditorFields
  parts: BuildPartRow[]
  photos: BuildPhotoRow[]
  pulls: EditorPull[]
  /** Empty when the build can be published. */
  publishIssues: PublishIssue[]
}

/** The parse preview of a pull file: the curve, the parser's warnings and the evidence report, nothing saved. */
export interface PullPreview {
  points: { rpm: number, hp: number, lbFt: number }[]
  warnings: string[]
  checks: EvidenceCheck[]
  summary: PullSummaryFigures
}

/** The body of a 422 for a pull file that does not parse. */
export interface PullParseRefusal {
  errors: ParseError[]
}
