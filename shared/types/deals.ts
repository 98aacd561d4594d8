/** The shapes the deal routes answer with, used by the pages. */
import type { MilestoneStateName } from '../deals/constants'
import type { QuoteAlternative } from '../schemas/deals'

export type DealSide = 'racer' | 'builder' | 'admin'

export interface DealFile {
  id: number
  name: string
  mime: string
  sizeBytes: number
}

export interface ThreadMessageView {
  id: number
  kind: 'message' | 'event'
  senderId: number | null
  senderName: string | null
  mine: boolean
  body: string
  createdAt: string
  attachments: DealFile[]
}

export interface QuoteLineView {
  position: number
  category: string
  description: string
  partNumber: string
  quantity: number
  unitPriceCents: number
  lineTotalCents: number
}

export interface QuoteMilestoneView {
  position: number
  title: string
  deliverable: string
  amountCents: number
  dueDate: string
}

export interface QuoteRevisionView {
  revision: number
  totalCents: number
  platformFeeBps: number
  platformFeeCents: number
  validUntil: string
  notes: string
  guarantee: { hp: number, tolerancePct: number, standard: string } | null
  createdAt: string
  lineItems: QuoteLineView[]
  milestones: QuoteMilestoneView[]
  /** Another combination offered beside the line items, with its displacement computed by shared/engine. */
  alternative: AlternativeView | null
}

export interface AlternativeView extends QuoteAlternative {
  /** displacementCi(bore, stroke, cylinders), never typed by the shop. */
  displacementCi: number
}

/** A change order as its parties see it: the milestones that replace the ones still awaiting payment. */
export interface ChangeOrderView {
  id: number
  status: 'open' | 'accepted' | 'declined'
  totalCents: number
  /** What the milestones it would replace (those awaiting payment) add up to now; null once answered. */
  replacedCents: number | null
  milestones: QuoteMilestoneView[]
  lineItems: QuoteLineView[]
  notes: string
  declineReason: string | null
  createdAt: string
  answeredAt: string | null
}

export interface QuoteView {
  id: number
  status: 'sent' | 'accepted' | 'declined' | 'withdrawn'
  currentRevision: number
  expired: boolean
  current: QuoteRevisionView
  /** Every revision, newest first, with its figures: the history the racer can compare. */
  history: QuoteRevisionView[]
}

export interface RequestView {
  id: number
  side: DealSide
  title: string
  status: string
  racer: { id: number, name: string }
  shop: { id: number, slug: string, shopName: string, region: string }
  build: { slug: string, title: string } | null
  targetHp: number
  targetTq: number | null
  targetStandard: string
  displacementCapCi: number | null
  fuel: string
  aspiration: string
  intendedUse: string
  transmission: string
  /** The launch rpm of a car without a converter, or null. */
  launchRpm: number | null
  stallRpm: number | null
  shiftRpm: number | null
  budgetMinCents: number
  budgetMaxCents: number
  deadline: string | null
  notes: string
  attachments: DealFile[]
  createdAt: string
  quote: QuoteView | null
  orderId: number | null
  platformFeeBps: number
}

export interface PaymentView {
  id: number
  kind: 'checkout' | 'refund' | 'transfer'
  status: 'open' | 'succeeded' | 'failed' | 'expired'
  amountCents: number
  stripeCheckoutSessionId: string | null
  stripePaymentIntentId: string | null
  stripeChargeId: string | null
  stripeRefundId: string | null
  stripeTransferId: string | null
  failureMessage: string | null
  createdAt: string
}

export interface DeliveryPullView {
  id: number
  status: 'verified' | 'rejected'
  meetsTarget: boolean
  fileName: string
  report: {
    standard: string
    peakHp: number
    peakHpRpm: number
    peakTq: number
    peakTqRpm: number
    displacementCi: number
    targetHp: number | null
    minimumHp: number | null
    checks: { id: string, outcome: 'pass' | 'warn' | 'fail', message: string }[]
    /** The pull under the quoted standard, for a chart; absent on pulls recorded before curves were kept. */
    curve?: { rpm: number, hp: number, lbFt: number }[]
    reasons: string[]
  }
  createdAt: string
}

export interface MilestoneView {
  id: number
  position: number
  title: string
  deliverable: string
  amountCents: number
  feeCents: number
  dueDate: string
  guaranteed: boolean
  state: MilestoneStateName
  submissionNotes: string | null
  disputeReason: string | null
  autoApproved: boolean
  fundedAt: string | null
  submittedAt: string | null
  approvedAt: string | null
  releasedAt: string | null
  refundedAt: string | null
  disputedAt: string | null
  /** When a submitted milestone is approved on its own if the racer does not answer. */
  autoApproveAt: string | null
  proofs: DealFile[]
  deliveryPull: DeliveryPullView | null
  payments: PaymentView[]
  /** The last decline or failure on the open payment, for the racer to see. */
  paymentProblem: string | null
}

export interface DealEventView {
  id: number
  action: string
  detail: string
  actorName: string | null
  milestoneId: number | null
  createdAt: string
}

export interface OrderView {
  id: number
  side: DealSide
  status: 'active' | 'completed' | 'cancelled'
  requestId: number
  title: string
  racer: { id: number, name: string }
  shop: { id: number, slug: string, shopName: string }
  totalCents: number
  platformFeeCents: number
  revision: number
  guarantee: { hp: number, tolerancePct: number, standard: string } | null
  displacementCapCi: number | null
  createdAt: string
  cancelledAt: string | null
  completedAt: string | null
  milestones: MilestoneView[]
  events: DealEventView[]
  documents: DealFile[]
  paidCents: number
  releasedCents: number
  refundedCents: number
  /** The open change order, or the last answered one; null when none was sent. */
  changeOrder: ChangeOrderView | null
  /** True when the shop may send a change order now: a refunded milestone, an active order and none open. */
  changeOrderAllowed: boolean
}

export interface DashboardRequestRow {
  id: number
  title: string
  status: string
  counterparty: string
  lastMessageAt: string
  unread: number
  quoteTotalCents: number | null
  quoteStatus: string | null
  orderId: number | null
}

export interface DashboardOrderRow {
  id: number
  requestId: number
  title: string
  status: 'active' | 'completed' | 'cancelled'
  counterparty: string
  totalCents: number
  nextMilestone: { id: number, title: string, state: MilestoneStateName, amountCents: number } | null
  milestonesDone: number
  milestonesTotal: number
  /** Unread messages in the order's thread, so the list shows where the navigation's count comes from. */
  unread: number
}

export interface DashboardView {
  side: DealSide
  requests: DashboardRequestRow[]
  quotes: DashboardRequestRow[]
  orders: DashboardOrderRow[]
  unreadTotal: number
}
