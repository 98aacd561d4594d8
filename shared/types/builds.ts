/** The shapes the build routes answer with, used by the pages. */
import type { PublishableBuild } from '../schemas/build'

export interface ShopCard {
  slug: string
  shopName: string
  region: string
}

/** A published build's combination fields as the publish schema (shared/schemas/build.ts) holds them. */
export type ListedCombination = Omit<PublishableBuild, 'title'>

export interface BuildSummary extends Pick<ListedCombination, 'engineFamily' | 'cylinders' | 'aspiration' | 'fuel' | 'intendedUse' | 'priceCents'> {
  slug: string
  title: string
  displacementCi: number
  peakHp: number | null
  peakHpRpm: number | null
  peakTq: number | null
  peakTqRpm: number | null
  verified: boolean
  shop: ShopCard
}

export interface BuildPartRow {
  position: number
  category: string
  part: string
  partNumber: string
  quantity: number
  unitPriceCents: number
}

export interface BuildDetail extends BuildSummary, ListedCombination {
  publishedAt: string | null
  photos: BuildPhotoRow[]
  parts: BuildPartRow[]
  pulls: PullSummaryRow[]
}

export interface BuildPhotoRow {
  id: number
  caption: string
  /** Where the image is served (the build page's own route). */
  url: string
}

export interface PullSummaryRow {
  id: number
  label: string
  dynoKind: 'engine' | 'chassis'
  declaredStandard: string
  status: 'submitted' | 'verified' | 'rejected'
  peakHp: number
  peakHpRpm: number
  peakTq: number
  peakTqRpm: number
}

export interface ShopFigures {
  verifiedBuilds: number
  minPeakHp: number | null
  maxPeakHp: number | null
  /** Median of peak hp ÷ displacement over the verified builds. */
  medianHpPerCi: number | null
}

export interface ShopDetail extends ShopCard {
  bio: string
  specialties: string[]
  capabilities: string[]
  builds: BuildSummary[]
  figures: ShopFigures
}

export interface Page<T> {
  total: number
  page: number
  perPage: number
  items: T[]
}

/** One pull re-expressed under the viewer's standard, from the raw file and the shop's weather. */
export interface CurvePull {
  id: number
  label: string
  /** SHA-256 of the raw file as the shop uploaded it (downloadable at …/pulls/:id/raw). */
  sha256: string
  status: 'submitted' | 'verified' | 'rejected'
  dynoKind: 'engine' | 'chassis'
  declaredStandard: string
  weather: { baroInHg: number, airTempF: number, humidityPct: number } | null
  comparisonRole: 'baseline' | 'variant' | null
  changeKind: string | null
  changeNote: string | null
  /** The standard the points are under; 'UNCORRECTED' when the weather was unknown. */
  standard: string
  uncorrected: boolean
  notes: string[]
  points: { rpm: number, hp: number, lbFt: number }[]
  peaks: { peakHp: number, peakHpRpm: number, peakTq: number, peakTqRpm: number }
}

export interface CurveComparison {
  baselineId: number
  variantId: number
  changeKind: string | null
  changeNote: string | null
  points: { rpm: number, hpDelta: number, tqDelta: number }[]
  sentence: string
  maxGainHp: number
  maxGainRpm: number | null
  maxLossHp: number
  maxLossRpm: number | null
}

export interface BuildCurves {
  slug: string
  standard: string
  /** The pull whose figures headline the build (shared/pulls/headline.ts), or null when none may. */
  headlineId: number | null
  headlineBasis: 'verified' | 'awaiting' | null
  pulls: CurvePull[]
  comparisons: CurveComparison[]
}

/** One build on the compare page: its combination and price, its headline pull, and its average power across the racer's band. */
export interface CompareRow {
  build: Omit<BuildDetail, 'parts' | 'pulls' | 'photos'>
  pull: CurvePull | null
  /** Average power in hp across the band under the chosen standard; null without a band or when the pull does not cover it. */
  bandAvgHp: number | null
}
