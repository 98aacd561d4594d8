/** The shapes the admin routes answer with, used by the admin pages. */
import type { MilestoneStateName } from '../deals/constants'
import type { EvidenceCheck, EvidenceOutcome } from '../engine/types'
import type { BuildStatus } from './editor'
import type { ListedCombination } from './builds'
import type { DealEventView, OrderView, ThreadMessageView } from './deals'

export type PullStatus = 'submitted' | 'verified' | 'rejected'

/** Another build whose curve matches (or nearly matches) the pull under review. */
export interface DuplicateLink {
  buildId: number
  slug: string
  title: string
  status: BuildStatus
  shopName: string
  /** Whether the check found it the same curve (fail) or only very close (warn). */
  outcome: EvidenceOutcome
}

/** One line of the evidence queue. */
export interface EvidenceQueueItem {
  pullId: number
  label: string
  submittedAt: string
  build: { id: number, slug: string, title: string, status: BuildStatus, verified: boolean }
  shop: { slug: string, shopName: string }
  /** The worst outcome of the stored check report. */
  outcome: EvidenceOutcome
  /** Checks that warned or failed, by id. */
  flagged: { id: string, outcome: EvidenceOutcome }[]
  duplicate: DuplicateLink | null
  /** How many earlier pulls of the same build were rejected (a re-upload after rejection). */
  earlierRejections: number
}

export interface PeakFigures {
  peakHp: number | null
  peakHpRpm: number | null
  peakTq: number | null
  peakTqRpm: number | null
}

export interface ReviewCurve {
  label: string
  standard: string
  points: { rpm: number, hp: number, lbFt: number }[]
}

/** Everything an admin needs to decide one pull. */
export interface EvidenceReview {
  pull: {
    id: number
    label: string
    status: PullStatus
    dynoKind: 'engine' | 'chassis'
    declaredStandard: string
    declaredFactor: number | null
    weather: { baroInHg: number, airTempF: number, humidityPct: number } | null
    submittedAt: string
    reviewedAt: string | null
    reviewNote: string | null
    comparisonRole: 'baseline' | 'variant' | null
    changeNote: string | null
  }
  build: {
    id: number
    slug: string
    title: string
    status: BuildStatus
    verified: boolean
    shop: { slug: string, shopName: string, ownerName: string, ownerEmail: string }
    figures: PeakFigures
  }
  combination: ReviewCombination
  file: { name: string, mime: string, sizeBytes: number, sha256: string, lines: number, preview: string, truncated: boolean }
  sheet: { name: string, mime: string, sizeBytes: number } | null
  declared: PeakFigures & { standard: string, factor: number | null }
  /** Peaks recomputed from the raw file: as filed (the shop's standard) and under the build standard. */
  recomputed: { asFiled: PeakFigures & { standard: string }, normalised: PeakFigures & { standard: string, uncorrected: boolean } }
  curves: ReviewCurve[]
  checks: EvidenceCheck[]
  duplicates: DuplicateLink[]
  /** The build's other pulls that were already decided, newest first. */
  history: { pullId: number, label: string, status: PullStatus, reviewNote: string | null, reviewedAt: string | null }[]
}

/** The build's combination as the admin compares it with the curve. */
export interface ReviewCombination extends Omit<ListedCombination, 'summary' | 'camIntakeLiftIn' | 'camExhaustLiftIn' | 'priceCents'> {
  displacementCi: number
}

export interface DecisionResult {
  pullId: number
  status: PullStatus
  buildSlug: string
  /** Whether the e-mail to the shop went out (rejections); null when none is sent. */
  mailed: boolean | null
}

/** One build as the moderation page shows it. */
export interface AdminBuildRow {
  id: number
  slug: string
  title: string
  status: BuildStatus
  verified: boolean
  publishedAt: string | null
  shop: { slug: string, shopName: string }
  pulls: { submitted: number, verified: number, rejected: number }
  /** The last time an admin took it down, from the audit log. */
  lastUnpublished: { at: string, reason: string | null, by: string | null } | null
}

export interface AuditRow {
  id: number
  at: string
  action: string
  entityType: string
  entityId: number
  actor: { id: number, name: string, email: string } | null
  before: Record<string, unknown> | null
  after: Record<string, unknown> | null
  note: string | null
}

export interface AuditPage {
  total: number
  page: number
  perPage: number
  items: AuditRow[]
  /** Every action and entity type on record, for the filter menus. */
  actions: string[]
  entityTypes: string[]
}

/** The admin dashboard's figures, each counted from the rows themselves. */
export interface AdminOverview {
  queue: { length: number, oldestSubmittedAt: string | null, oldestAgeHours: number | null }
  builds: { published: number, verified: number, verifiedShare: number | null }
  /** Milestones in the disputed state, with the age of the oldest. */
  disputes: { open: number, oldestOpenedAt: string | null, oldestAgeHours: number | null }
  /** Money this calendar month (UTC): deposits captured and refunds made. */
  payments: { month: string, count: number, amountCents: number, refunds: { count: number, amountCents: number } }
}

/** One open dispute on the admin's list. */
export interface DisputeListItem {
  milestoneId: number
  orderId: number
  requestId: number
  title: string
  racer: { id: number, name: string }
  shop: { slug: string, shopName: string }
  milestone: { title: string, position: number, amountCents: number }
  disputedAt: string
  reason: string
}

/** A dispute an admin settled, from the audit log. */
export interface SettledDisputeItem extends Omit<DisputeListItem, 'disputedAt'> {
  disputedAt: string | null
  settledAt: string
  outcome: 'refund' | 'release'
  note: string | null
  settledBy: string | null
  /** The milestone's state now (refunded, released, or approved while its payout waits). */
  state: string
}

export interface DisputeList {
  open: DisputeListItem[]
  settled: SettledDisputeItem[]
}

/** Everything an admin needs to settle one dispute: the order, the milestone with its proof and payments, the thread. */
export interface DisputeReview {
  milestoneId: number
  state: MilestoneStateName
  reason: string | null
  disputedAt: string | null
  order: OrderView
  parties: { racer: { name: string, email: string }, shop: { shopName: string, slug: string, ownerName: string, ownerEmail: string } }
  thread: ThreadMessageView[]
  /** The order's history lines about this milestone, oldest first. */
  history: DealEventView[]
  /** The decision once it is made, from the audit log. */
  settlement: { outcome: 'refund' | 'release', note: string | null, at: string, by: string | null, after: Record<string, unknown> | null } | null
}

export interface SettleDisputeResult {
  milestoneId: number
  outcome: 'refund' | 'release'
  state: MilestoneStateName
  /** Why the payout of a release is still waiting (it is retried on its own), or null. */
  problem: string | null
}
