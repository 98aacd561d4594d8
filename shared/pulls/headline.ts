/**
 * Which pull speaks for a build: its headline figures on cards, in search (filters and sorts), on the
 * build page, in the shop's figures and in saved-search e-mails. One rule, used everywhere:
 *
 * 1. the strongest verified pull (peak power under the build standard);
 * 2. with none verified, the strongest pull still awaiting verification whose automatic report has no
 *    failure — shown as awaiting verification;
 * 3. otherwise none: a pull that fails one of its own automatic checks, or a rejected one, never sets
 *    a headline or a figure anyone can filter on.
 *
 * Ties go to the earlier pull (the lower id), so the choice is stable.
 */

export type HeadlineBasis = 'verified' | 'awaiting'

export interface HeadlineCandidate {
  id: number
  status: 'submitted' | 'verified' | 'rejected'
  summary: { peakHp: number }
  /** The automatic report saved with the pull; null for a pull saved before reports were kept. */
  checks: readonly { outcome: string }[] | null
}

/** True when the pull's own automatic report has a failing check. */
export function failsItsChecks(pull: Pick<HeadlineCandidate, 'checks'>): boolean {
  return (pull.checks ?? []).some(c => c.outcome === 'fail')
}

function strongest<T extends HeadlineCandidate>(list: readonly T[]): T | null {
  let best: T | null = null
  for (const p of list) {
    if (!best || p.summary.peakHp > best.summary.peakHp || (p.summary.peakHp === best.summary.peakHp && p.id < best.id)) best = p
  }
  return best
}

/** The pull that speaks for a build, and on what footing; null when no pull may. */
export function headlinePull<T extends HeadlineCandidate>(pulls: readonly T[]): { pull: T, basis: HeadlineBasis } | null {
  const verified = strongest(pulls.filter(p => p.status === 'verified'))
  if (verified) return { pull: verified, basis: 'verified' }
  const awaiting = strongest(pulls.filter(p => p.status === 'submitted' && !failsItsChecks(p)))
  return awaiting ? { pull: awaiting, basis: 'awaiting' } : null
}
