import type { RatingSummary, ReviewAspect } from '../reviews/aspects'
import type { RecordFigure, TrackRecord } from '../reviews/track-record'

/** A review as the public pages show it. */
export interface ReviewView {
  id: number
  rating: number
  aspects: Record<ReviewAspect, number | null>
  body: string
  /** The reviewer's first name only. */
  author: string
  createdAt: string
  editedAt: string | null
  /** Earlier versions, oldest first. */
  edits: { rating: number, body: string, writtenAt: string }[]
  answer: { body: string, at: string } | null
  build: { slug: string, title: string } | null
  /** The delivery pull's figures, when the racer chose to show them beside the review. */
  deliveryPull: { peakHp: number, standard: string, targetHp: number | null, minimumHp: number | null } | null
}

export interface ReviewList {
  summary: RatingSummary
  reviews: ReviewView[]
  /** Reviews an admin hid (not counted in the summary). */
  hiddenCount: number
}

/** An order's review for its parties, and what the caller may do with it. */
export interface OrderReview {
  review: (ReviewView & { hidden: boolean, hiddenReason: string | null, canEdit: boolean, showDeliveryPull: boolean }) | null
  canReview: boolean
  canAnswer: boolean
}

/** One counted item behind a track-record figure: which deal (numbered per shop), when, and how it counted. */
export interface RecordItem {
  deal: number
  month: string
  outcome: string
  /** Only for the deal's parties (and admins): what the deal is and where it lives. */
  title?: string
  link?: string
}

export interface ShopRecordView {
  shop: string
  record: TrackRecord
  recordScore: number
  scoreExplained: string
}

export interface RecordFigureView {
  shop: { slug: string, name: string }
  figure: RecordFigure
  label: string
  items: RecordItem[]
}

export interface AdminReviewRow {
  id: number
  orderId: number
  shop: { name: string, slug: string }
  rating: number
  body: string
  createdAt: string
  hidden: boolean
  hiddenReason: string | null
}
