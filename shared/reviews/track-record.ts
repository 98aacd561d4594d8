/**
 * A shop's track record: figures computed from its deals (never typed in), each with its sample size,
 * and the part of the for-target score they make. Pure. The weights are Torquewright's own choice
 * (README, "Reviews and track record"), not a trade standard.
 */

export const RECORD_FIGURES = ['orders', 'on-time', 'guarantees', 'disputes', 'first-reply', 'quote-time'] as const
export type RecordFigure = (typeof RECORD_FIGURES)[number]

export const RECORD_FIGURE_LABELS: Record<RecordFigure, string> = {
  'orders': 'Orders completed',
  'on-time': 'Milestones submitted on or before their due date',
  'guarantees': 'Power guarantees met at delivery',
  'disputes': 'Disputes opened and how they ended',
  'first-reply': 'Median time to first reply on a request',
  'quote-time': 'Median time to a quote',
}

export interface TrackRecord {
  /** Orders: completed, still running and cancelled; the sample is every order. */
  orders: { completed: number, active: number, cancelled: number, total: number }
  /** Submitted milestones, and how many were submitted on or before their due date (UTC day). */
  onTime: { onTime: number, submitted: number, sharePct: number | null }
  /** Guaranteed milestones decided by a verified delivery pull under the quoted standard. */
  guarantees: { met: number, missed: number, counted: number, sharePct: number | null }
  /** Milestones disputed, by how they ended: refunded to the racer, released to the shop, or still open. */
  disputes: { opened: number, refunded: number, released: number, open: number, ordersWithLoss: number }
  /** Hours from a request to the shop's first message or quote, median over the answered requests. */
  firstReply: { medianHours: number | null, answered: number, requests: number }
  /** Hours from a request to the shop's first quote, median over the quoted requests. */
  quoteTime: { medianHours: number | null, quoted: number, requests: number }
}

/** The middle value (mean of the two middle ones for an even count), or null for none. */
export function median(values: number[]): number | null {
  if (values.length === 0) return null
  const s = [...values].sort((a, b) => a - b)
  const mid = Math.floor(s.length / 2)
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2
}

export const pct = (k: number, n: number): number | null => n === 0 ? null : Math.round(1000 * k / n) / 10

/**
 * Laplace's rule of succession, (k + 1) / (n + 2): a share that starts at one half with no deals and
 * moves toward the observed share as deals add up, so two lucky deals do not outrank forty good ones.
 */
export const succession = (k: number, n: number) => (k + 1) / (n + 2)

/** Weights of the record score's parts (sum 1) and the record's share of the for-target score. */
export const RECORD_WEIGHTS = { onTime: 0.35, guarantees: 0.3, clean: 0.2, responsiveness: 0.15 } as const
export const RECORD_SHARE = 0.25

/** 0–100 from the record; a shop without deals scores 50 (every part at one half). */
export function recordScore(r: TrackRecord): number {
  const onTime = succession(r.onTime.onTime, r.onTime.submitted)
  const guarantees = succession(r.guarantees.met, r.guarantees.counted)
  const clean = succession(r.orders.total - r.disputes.ordersWithLoss, r.orders.total)
  // One half at a day's median first reply, toward 1 for quicker and toward 0 for slower.
  const responsiveness = r.firstReply.medianHours === null ? 0.5 : 1 / (1 + r.firstReply.medianHours / 24)
  const w = RECORD_WEIGHTS
  return Math.round(1000 * (w.onTime * onTime + w.guarantees * guarantees + w.clean * clean + w.responsiveness * responsiveness)) / 10
}

/** The for-target score: the proven-builds score and the record score, weighted 75/25. */
export function combinedScore(proofScore: number, record: number): number {
  return Math.round(10 * ((1 - RECORD_SHARE) * proofScore + RECORD_SHARE * record)) / 10
}

export const SCORE_EXPLAINED = [
  'score = 0.75 × proof + 0.25 × record, each 0–100.',
  'proof: how close (45 %), how consistent (30 %) and how many (25 %) the shop\'s verified builds near the target are.',
  'record: 35 % milestones on time, 30 % power guarantees met, 20 % orders without a dispute lost or open, 15 % speed of first reply;',
  'each share is (k + 1) / (n + 2) (Laplace\'s rule of succession), so a shop with few deals sits near one half;',
  'reply speed is 1 / (1 + median hours / 24). A shop without deals has record 50.',
].join(' ')

/** The compact words of a record for cards, e.g. "12 orders completed · 92 % on time (25)". */
export function compactRecord(r: TrackRecord): string {
  const parts = [`${r.orders.completed} ${r.orders.completed === 1 ? 'order' : 'orders'} completed`]
  if (r.onTime.sharePct !== null) parts.push(`${r.onTime.sharePct} % on time (${r.onTime.submitted})`)
  if (r.guarantees.sharePct !== null) parts.push(`${r.guarantees.met} of ${r.guarantees.counted} guarantees met`)
  if (r.disputes.opened > 0) parts.push(`${r.disputes.opened} ${r.disputes.opened === 1 ? 'dispute' : 'disputes'}`)
  return parts.join(' · ')
}

/** Hours in words: "40 min", "5.5 h", "3.2 days". */
export function hoursText(h: number | null): string {
  if (h === null) return '—'
  if (h < 1) return `${Math.max(1, Math.round(h * 60))} min`
  if (h < 48) return `${Math.round(h * 10) / 10} h`
  return `${Math.round(h / 2.4) / 10} days`
}
